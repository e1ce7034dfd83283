import { DataTypes } from 'sequelize';
import type { Step } from '../step';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

/** Study sets: a coach's species list for an event or class, in the coach's order. */
export const studySets: Step = {
  name: '0004-study-sets',
  async up({ context: { queryInterface } }) {
    await queryInterface.createTable('study_sets', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      event_name: { type: DataTypes.STRING(200), allowNull: true },
      event_date: { type: DataTypes.DATEONLY, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      shared: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      owner_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      ...timestamps,
    });
    await queryInterface.addIndex('study_sets', ['owner_id'], { name: 'study_sets_owner_id' });

    await queryInterface.createTable('study_set_taxa', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      study_set_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'study_sets', key: 'id' }, onDelete: 'CASCADE' },
      taxon_id: { type: DataTypes.STRING(120), allowNull: false, references: { model: 'taxa', key: 'id' }, onUpdate: 'CASCADE', onDelete: 'CASCADE' },
      position: { type: DataTypes.INTEGER, allowNull: false },
      ...timestamps,
    });
    await queryInterface.addIndex('study_set_taxa', ['study_set_id', 'taxon_id'], { unique: true, name: 'study_set_taxa_set_taxon' });
  },
  async down({ context: { queryInterface } }) {
    await queryInterface.dropTable('study_set_taxa');
    await queryInterface.dropTable('study_sets');
  },
};
