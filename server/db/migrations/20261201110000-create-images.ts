import { DataTypes, Op } from 'sequelize';
import type { Migration } from '../migrator.ts';

const real = { type: DataTypes.DOUBLE, allowNull: true };
const text = { type: DataTypes.TEXT, allowNull: true };
const realArray = { type: DataTypes.ARRAY(DataTypes.DOUBLE), allowNull: true };
const textArray = { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: true };

/**
 * One stored DICOM file: identity (hash, SOP Instance UID), image geometry,
 * every acquisition attribute of PHYSICS.md §9 as a typed column (values as
 * the file gave them), the header without bulk or patient data, trust
 * warnings, and the user's corrections kept beside the file's values.
 *
 * A study's deletion detaches its images (SET NULL) rather than deleting
 * them, so no stored file loses its row; attaching them elsewhere stays
 * possible.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('images', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'studies', key: 'id' },
      onDelete: 'SET NULL',
    },
    uploaded_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    sha256: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    sop_instance_uid: text,
    sop_class_uid: text,
    study_instance_uid: text,
    series_instance_uid: text,
    original_name: { type: DataTypes.TEXT, allowNull: false },
    storage_key: { type: DataTypes.TEXT, allowNull: false },
    size_bytes: { type: DataTypes.BIGINT, allowNull: false },

    rows: { type: DataTypes.INTEGER, allowNull: false },
    columns: { type: DataTypes.INTEGER, allowNull: false },
    frames: { type: DataTypes.INTEGER, allowNull: false },
    transfer_syntax_uid: { type: DataTypes.TEXT, allowNull: false },
    photometric_interpretation: { type: DataTypes.TEXT, allowNull: false },
    bits_allocated: { type: DataTypes.SMALLINT, allowNull: false },
    bits_stored: { type: DataTypes.SMALLINT, allowNull: false },
    pixel_representation: { type: DataTypes.SMALLINT, allowNull: false },
    samples_per_pixel: { type: DataTypes.SMALLINT, allowNull: false },
    rescale_slope: real,
    rescale_intercept: real,
    // The spacing measurements use, and which attribute it came from.
    spacing_row_mm: real,
    spacing_column_mm: real,
    spacing_source: text,

    kvp: real,
    exposure_mas: real,
    exposure_mas_source: text,
    tube_current_ma: real,
    exposure_time_ms: real,
    sid_mm: real,
    source_to_patient_mm: real,
    dap_dgy_cm2: real,
    entrance_dose_mgy: real,
    filter_material: textArray,
    filter_thickness_min_mm: realArray,
    filter_thickness_max_mm: realArray,
    grid: textArray,
    grid_absorbing_material: text,
    grid_spacing_material: text,
    grid_thickness_mm: real,
    grid_pitch_mm: real,
    grid_aspect_ratio: realArray,
    grid_period_ms: real,
    grid_focal_distance_mm: real,
    grid_id: text,
    exposure_index: real,
    target_exposure_index: real,
    deviation_index: real,
    relative_x_ray_exposure: real,
    sensitivity: real,
    detector_id: text,
    detector_type: text,
    imager_pixel_spacing_row_mm: real,
    imager_pixel_spacing_column_mm: real,
    pixel_spacing_row_mm: real,
    pixel_spacing_column_mm: real,
    station_name: text,
    device_serial_number: text,
    manufacturer: text,
    manufacturer_model_name: text,
    body_part_thickness_mm: real,
    body_part_examined: text,
    view_position: text,
    presentation_intent_type: text,
    pixel_intensity_relationship: text,
    pixel_intensity_relationship_sign: real,
    lossy_image_compression: text,
    lossy_image_compression_ratio: realArray,
    lossy_image_compression_method: textArray,
    modality: text,
    // ISO 8601 as the file gave it: usually local time with no zone.
    acquisition_date_time: text,

    header: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    corrections: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('images', ['sop_instance_uid'], {
    name: 'images_sop_instance_uid_unique',
    unique: true,
    where: { sop_instance_uid: { [Op.ne]: null } },
  });
  await q.addIndex('images', ['study_id']);
  await q.addIndex('images', ['uploaded_by']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('images');
};
