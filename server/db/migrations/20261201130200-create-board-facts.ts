import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

const real = { type: DataTypes.DOUBLE, allowNull: true };

/**
 * The comparison board's facts about signed studies: one row per condition
 * with its keys and the aggregated figures side by side, so the board
 * aggregates without joining four tables. A signed revision is locked, so
 * its rows never change; `board_fact_studies` records which revision (and
 * signing) each study's rows were taken from, and the board replaces them
 * when a study is revised or re-signed (compare-board.service.ts).
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('board_fact_studies', {
    study_id: {
      type: DataTypes.INTEGER,
      primaryKey: true,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    signed_at: { type: DataTypes.DATE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  const figureColumns = Object.fromEntries(
    ['sif', 'cif', 'bucky', 'tp', 'ts', 'sel'].flatMap((prefix) => [
      [`${prefix}_value`, real],
      [`${prefix}_se`, real],
      // 1/SE², null without an SE: the weight of an inverse-variance mean.
      [`${prefix}_weight`, real],
      [`${prefix}_low`, real],
      [`${prefix}_high`, real],
    ]),
  );
  await q.createTable('board_facts', {
    condition_id: {
      type: DataTypes.INTEGER,
      primaryKey: true,
      references: { model: 'study_conditions', key: 'id' },
      onDelete: 'CASCADE',
    },
    analysis_id: { type: DataTypes.INTEGER, allowNull: false },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'board_fact_studies', key: 'study_id' },
      onDelete: 'CASCADE',
    },
    position: { type: DataTypes.INTEGER, allowNull: false },
    room_id: { type: DataTypes.INTEGER, allowNull: false },
    detector_id: { type: DataTypes.INTEGER, allowNull: true },
    grid_id: { type: DataTypes.INTEGER, allowNull: false },
    kvp: { type: DataTypes.DOUBLE, allowNull: false },
    phantom_thickness_cm: { type: DataTypes.DOUBLE, allowNull: false },
    signed_at: { type: DataTypes.DATE, allowNull: false },
    ...figureColumns,
  });
  await q.addIndex('board_facts', ['study_id']);
  await q.sequelize.query(
    'CREATE INDEX board_facts_newest ON board_facts (signed_at DESC, study_id DESC, position)',
  );
  // The live half of the board (unsigned studies, for physicists) and its
  // list ordered by date.
  await q.sequelize.query(
    'CREATE INDEX studies_status_room_signed_at ON studies (status, room_id, signed_at)',
  );
  await q.sequelize.query(
    'CREATE INDEX studies_board_date ON studies ((COALESCE(signed_at, created_at)) DESC, id DESC)',
  );
  await q.sequelize.query(
    'CREATE INDEX study_conditions_board ON study_conditions (study_id) INCLUDE (grid_id, kvp, phantom_thickness_cm, position)',
  );
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.sequelize.query('DROP INDEX IF EXISTS study_conditions_board');
  await q.sequelize.query('DROP INDEX IF EXISTS studies_board_date');
  await q.sequelize.query('DROP INDEX IF EXISTS studies_status_room_signed_at');
  await q.dropTable('board_facts');
  await q.dropTable('board_fact_studies');
};
