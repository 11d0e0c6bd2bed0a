import { AppError } from '../../errors.ts';
import { StudyCondition } from '../../models/study-condition.model.ts';
import { Study } from '../../models/study.model.ts';
import { User } from '../../models/user.model.ts';
import { createBaseline } from '../../services/baseline.service.ts';
import { DEMO_USERS } from '../demo-users.ts';

// The demo physicist keeps every signed demo study's conditions as its
// room's baselines, as after an acceptance test, with the default ±10 %
// (local policy); later studies of those rooms are then flagged on the
// board, the room summary and the trends. Invented data only.
export async function up(): Promise<void> {
  const email = DEMO_USERS.find((u) => u.role === 'physicist')!.email;
  const physicist = await User.findOne({ where: { email } });
  if (!physicist) return;
  const studies = await Study.findAll({
    where: { status: 'signed' },
    order: [['signedAt', 'ASC']],
  });
  for (const study of studies) {
    const conditions = await StudyCondition.findAll({
      where: { studyId: study.id },
      order: [['position', 'ASC']],
    });
    for (const condition of conditions) {
      try {
        await createBaseline(
          {
            conditionId: condition.id,
            tolerances: {},
            note: 'Acceptance baseline of the demo (local policy ±10 %).',
          },
          { actorId: physicist.id, ipAddress: null },
        );
      } catch (error) {
        // A condition whose analysis failed has nothing to keep.
        if (!(error instanceof AppError && error.status === 409)) throw error;
      }
    }
  }
}
