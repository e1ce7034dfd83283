import { DataTypes } from 'sequelize';
import type { Step } from '../step';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

/** The working matrix (traits, values, taxa, cells) and the published editions. */
export const matrix: Step = {
  name: '0001-matrix',
  async up({ context: { queryInterface } }) {
    await queryInterface.createTable('traits', {
      code: { type: DataTypes.STRING(64), primaryKey: true },
      label: { type: DataTypes.STRING(200), allowNull: false },
      part: { type: DataTypes.STRING(32), allowNull: false },
      kind: { type: DataTypes.STRING(16), allowNull: false },
      unit: { type: DataTypes.STRING(8), allowNull: true },
      season: { type: DataTypes.STRING(16), allowNull: false },
      ease: { type: DataTypes.FLOAT, allowNull: false },
      error_rate: { type: DataTypes.FLOAT, allowNull: false },
      help: { type: DataTypes.TEXT, allowNull: true },
      applies_when: { type: DataTypes.JSON, allowNull: true },
      count_range: { type: DataTypes.JSON, allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...timestamps,
    });
    await queryInterface.createTable('trait_values', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      trait_code: {
        type: DataTypes.STRING(64),
        allowNull: false,
        references: { model: 'traits', key: 'code' },
        onUpdate: 'CASCADE',
        onDelete: 'CASCADE',
      },
      code: { type: DataTypes.STRING(64), allowNull: false },
      label: { type: DataTypes.STRING(200), allowNull: false },
      definition: { type: DataTypes.TEXT, allowNull: true },
      illustration: { type: DataTypes.STRING(200), allowNull: true },
      synonyms: { type: DataTypes.JSON, allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...timestamps,
    });
    await queryInterface.addIndex('trait_values', ['trait_code', 'code'], { unique: true, name: 'trait_values_trait_code_code' });

    await queryInterface.createTable('taxa', {
      id: { type: DataTypes.STRING(120), primaryKey: true },
      scientific_name: { type: DataTypes.STRING(200), allowNull: false, unique: true },
      authority: { type: DataTypes.STRING(200), allowNull: false },
      family: { type: DataTypes.STRING(100), allowNull: false },
      common_names: { type: DataTypes.JSON, allowNull: false },
      status: { type: DataTypes.STRING(16), allowNull: true },
      prior: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 1 },
      source: { type: DataTypes.TEXT, allowNull: true },
      habitat: { type: DataTypes.TEXT, allowNull: true },
      range: { type: DataTypes.TEXT, allowNull: true },
      cautions: { type: DataTypes.JSON, allowNull: true },
      look_alikes: { type: DataTypes.JSON, allowNull: true },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...timestamps,
    });

    await queryInterface.createTable('cells', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxon_id: {
        type: DataTypes.STRING(120),
        allowNull: false,
        references: { model: 'taxa', key: 'id' },
        onUpdate: 'CASCADE',
        onDelete: 'CASCADE',
      },
      trait_code: {
        type: DataTypes.STRING(64),
        allowNull: false,
        references: { model: 'traits', key: 'code' },
        onUpdate: 'CASCADE',
        onDelete: 'CASCADE',
      },
      value: { type: DataTypes.JSON, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      ...timestamps,
    });
    await queryInterface.addIndex('cells', ['taxon_id', 'trait_code'], { unique: true, name: 'cells_taxon_trait' });

    await queryInterface.createTable('inseparable_pairs', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxon_a: { type: DataTypes.STRING(120), allowNull: false, references: { model: 'taxa', key: 'id' }, onDelete: 'CASCADE' },
      taxon_b: { type: DataTypes.STRING(120), allowNull: false, references: { model: 'taxa', key: 'id' }, onDelete: 'CASCADE' },
      reason: { type: DataTypes.TEXT, allowNull: false },
      ...timestamps,
    });

    await queryInterface.createTable('editions', {
      number: { type: DataTypes.INTEGER, primaryKey: true },
      title: { type: DataTypes.STRING(200), allowNull: false },
      published_at: { type: DataTypes.DATE, allowNull: false },
      published_by: { type: DataTypes.STRING(120), allowNull: true },
      summary: { type: DataTypes.JSON, allowNull: false },
      document: { type: DataTypes.JSON, allowNull: false },
      ...timestamps,
    });
  },
  async down({ context: { queryInterface } }) {
    for (const table of ['editions', 'inseparable_pairs', 'cells', 'taxa', 'trait_values', 'traits']) {
      await queryInterface.dropTable(table);
    }
  },
};
