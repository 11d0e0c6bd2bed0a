import { Router, type Request } from 'express';
import {
  byRoomQuerySchema,
  calibrationParamsSchema,
  createCalibrationSchema,
  createDetectorSchema,
  createGridSchema,
  createRoomSchema,
  createXrayUnitSchema,
  deriveGridSchema,
  fitCalibrationSchema,
  idParamsSchema,
  updateDetectorSchema,
  updateGridSchema,
  updateRoomSchema,
  updateXrayUnitSchema,
} from '../../shared/schemas/equipment.schema.ts';
import { authorize, currentUser } from '../middleware/authenticate.ts';
import {
  canEditEquipment,
  canViewEquipment,
} from '../policies/equipment.policy.ts';
import {
  presentCalibration,
  presentDetector,
  presentDetectorDetail,
  presentGrid,
  presentRoomDetail,
  presentXrayUnit,
} from '../presenters/equipment.presenter.ts';
import type { AuditContext } from '../services/audit.service.ts';
import {
  createCalibration,
  deleteCalibration,
  findCalibration,
  fitCalibrationPreview,
  listCalibrations,
} from '../services/detector-calibration.service.ts';
import {
  calibrationCounts,
  createDetector,
  createRoom,
  createXrayUnit,
  deleteDetector,
  deleteRoom,
  deleteXrayUnit,
  findDetectorById,
  findRoomById,
  findXrayUnitById,
  listDetectors,
  listRooms,
  listXrayUnits,
  loadRoomContents,
  updateDetector,
  updateRoom,
  updateXrayUnit,
} from '../services/equipment.service.ts';
import {
  createGrid,
  deleteGrid,
  deriveGridPreview,
  findGridById,
  listGrids,
  updateGrid,
} from '../services/grid.service.ts';

/** The signed-in reader; every role may read the register. */
function reader(req: Request): Express.User {
  const viewer = currentUser(req);
  authorize(canViewEquipment(viewer));
  return viewer;
}

/** The signed-in editor (admin or physicist), checked before any parsing. */
function editor(req: Request): { viewer: Express.User; audit: AuditContext } {
  const viewer = currentUser(req);
  authorize(canEditEquipment(viewer));
  return { viewer, audit: { actorId: viewer.id, ipAddress: req.ip ?? null } };
}

async function roomDetail(id: number, viewer: Express.User) {
  const room = await findRoomById(id);
  return presentRoomDetail(room, await loadRoomContents([room.id]), viewer);
}

async function detectorDetail(id: number, viewer: Express.User) {
  const detector = await findDetectorById(id);
  const [room, calibrations] = await Promise.all([
    findRoomById(detector.roomId),
    listCalibrations(detector.id),
  ]);
  return presentDetectorDetail(detector, room, calibrations, viewer);
}

/** The equipment register: rooms, X-ray units, detectors and their calibrations, grids. */
export function equipmentRouter(): Router {
  const router = Router();

  router.get('/rooms', async (req, res) => {
    const viewer = reader(req);
    const rooms = await listRooms();
    const contents = await loadRoomContents(rooms.map((r) => r.id));
    res.json({
      data: rooms.map((r) => presentRoomDetail(r, contents, viewer)),
    });
  });
  router.post('/rooms', async (req, res) => {
    const { viewer, audit } = editor(req);
    const room = await createRoom(createRoomSchema.parse(req.body), audit);
    res.status(201).json({ data: await roomDetail(room.id, viewer) });
  });
  router.get('/rooms/:id', async (req, res) => {
    const viewer = reader(req);
    const { id } = idParamsSchema.parse(req.params);
    res.json({ data: await roomDetail(id, viewer) });
  });
  router.patch('/rooms/:id', async (req, res) => {
    const { viewer, audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    const input = updateRoomSchema.parse(req.body);
    await updateRoom(await findRoomById(id), input, audit);
    res.json({ data: await roomDetail(id, viewer) });
  });
  router.delete('/rooms/:id', async (req, res) => {
    const { audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    await deleteRoom(await findRoomById(id), audit);
    res.status(204).end();
  });

  router.get('/units', async (req, res) => {
    const viewer = reader(req);
    const units = await listXrayUnits(byRoomQuerySchema.parse(req.query));
    res.json({ data: units.map((u) => presentXrayUnit(u, viewer)) });
  });
  router.post('/units', async (req, res) => {
    const { viewer, audit } = editor(req);
    const unit = await createXrayUnit(
      createXrayUnitSchema.parse(req.body),
      audit,
    );
    res.status(201).json({ data: presentXrayUnit(unit, viewer) });
  });
  router.get('/units/:id', async (req, res) => {
    const viewer = reader(req);
    const { id } = idParamsSchema.parse(req.params);
    res.json({ data: presentXrayUnit(await findXrayUnitById(id), viewer) });
  });
  router.patch('/units/:id', async (req, res) => {
    const { viewer, audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    const input = updateXrayUnitSchema.parse(req.body);
    const unit = await updateXrayUnit(await findXrayUnitById(id), input, audit);
    res.json({ data: presentXrayUnit(unit, viewer) });
  });
  router.delete('/units/:id', async (req, res) => {
    const { audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    await deleteXrayUnit(await findXrayUnitById(id), audit);
    res.status(204).end();
  });

  router.get('/detectors', async (req, res) => {
    const viewer = reader(req);
    const detectors = await listDetectors(byRoomQuerySchema.parse(req.query));
    const counts = await calibrationCounts(detectors.map((d) => d.id));
    res.json({
      data: detectors.map((d) =>
        presentDetector(d, counts.get(d.id) ?? 0, viewer),
      ),
    });
  });
  router.post('/detectors', async (req, res) => {
    const { viewer, audit } = editor(req);
    const detector = await createDetector(
      createDetectorSchema.parse(req.body),
      audit,
    );
    res.status(201).json({ data: await detectorDetail(detector.id, viewer) });
  });
  router.get('/detectors/:id', async (req, res) => {
    const viewer = reader(req);
    const { id } = idParamsSchema.parse(req.params);
    res.json({ data: await detectorDetail(id, viewer) });
  });
  router.patch('/detectors/:id', async (req, res) => {
    const { viewer, audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    const input = updateDetectorSchema.parse(req.body);
    await updateDetector(await findDetectorById(id), input, audit);
    res.json({ data: await detectorDetail(id, viewer) });
  });
  router.delete('/detectors/:id', async (req, res) => {
    const { audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    await deleteDetector(await findDetectorById(id), audit);
    res.status(204).end();
  });

  router.get('/detectors/:id/calibrations', async (req, res) => {
    const viewer = reader(req);
    const { id } = idParamsSchema.parse(req.params);
    const detector = await findDetectorById(id);
    const records = await listCalibrations(detector.id);
    res.json({ data: records.map((c) => presentCalibration(c, viewer)) });
  });
  router.post('/detectors/:id/calibrations', async (req, res) => {
    const { viewer, audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    const input = createCalibrationSchema.parse(req.body);
    const detector = await findDetectorById(id);
    const calibration = await createCalibration(detector, input, audit);
    res.status(201).json({ data: presentCalibration(calibration, viewer) });
  });
  router.get('/detectors/:id/calibrations/:calibrationId', async (req, res) => {
    const viewer = reader(req);
    const { id, calibrationId } = calibrationParamsSchema.parse(req.params);
    const calibration = await findCalibration(
      await findDetectorById(id),
      calibrationId,
    );
    res.json({ data: presentCalibration(calibration, viewer) });
  });
  router.delete(
    '/detectors/:id/calibrations/:calibrationId',
    async (req, res) => {
      const { audit } = editor(req);
      const { id, calibrationId } = calibrationParamsSchema.parse(req.params);
      const calibration = await findCalibration(
        await findDetectorById(id),
        calibrationId,
      );
      await deleteCalibration(calibration, audit);
      res.status(204).end();
    },
  );
  // A preview computes and stores nothing, so every reader may use it.
  router.post('/calibrations/fit', (req, res) => {
    reader(req);
    res.json({
      data: fitCalibrationPreview(fitCalibrationSchema.parse(req.body)),
    });
  });

  router.get('/grids', async (req, res) => {
    const viewer = reader(req);
    const grids = await listGrids(byRoomQuerySchema.parse(req.query));
    res.json({ data: grids.map((g) => presentGrid(g, viewer)) });
  });
  router.post('/grids/derive', (req, res) => {
    reader(req);
    res.json({ data: deriveGridPreview(deriveGridSchema.parse(req.body)) });
  });
  router.post('/grids', async (req, res) => {
    const { viewer, audit } = editor(req);
    const grid = await createGrid(createGridSchema.parse(req.body), audit);
    res.status(201).json({ data: presentGrid(grid, viewer) });
  });
  router.get('/grids/:id', async (req, res) => {
    const viewer = reader(req);
    const { id } = idParamsSchema.parse(req.params);
    res.json({ data: presentGrid(await findGridById(id), viewer) });
  });
  router.patch('/grids/:id', async (req, res) => {
    const { viewer, audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    const input = updateGridSchema.parse(req.body);
    const grid = await updateGrid(await findGridById(id), input, audit);
    res.json({ data: presentGrid(grid, viewer) });
  });
  router.delete('/grids/:id', async (req, res) => {
    const { audit } = editor(req);
    const { id } = idParamsSchema.parse(req.params);
    await deleteGrid(await findGridById(id), audit);
    res.status(204).end();
  });

  return router;
}
