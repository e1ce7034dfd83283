import { DataTypes } from 'sequelize';
import type { Step } from '../step';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

/** The curation audit log (who changed what, when and why) and the photos attached to taxa. */
export const curationAuditPhotos: Step = {
  name: '0002-curation-audit-photos',
  async up({ context: { queryInterface } }) {
    await queryInterface.createTable('audit_entries', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      actor_id: { type: DataTypes.INTEGER, allowNull: true },
      actor_email: { type: DataTypes.STRING(200), allowNull: true },
      entity: { type: DataTypes.STRING(32), allowNull: false },
      entity_key: { type: DataTypes.STRING(200), allowNull: false },
      action: { type: DataTypes.STRING(32), allowNull: false },
      before: { type: DataTypes.JSON, allowNull: true },
      after: { type: DataTypes.JSON, allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: false },
      ...timestamps,
    });
    await queryInterface.addIndex('audit_entries', ['entity', 'created_at'], { name: 'audit_entries_entity_created' });
    await queryInterface.addIndex('audit_entries', ['actor_id'], { name: 'audit_entries_actor' });

    await queryInterface.createTable('photos', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxon_id: {
        type: DataTypes.STRING(120),
        allowNull: false,
        references: { model: 'taxa', key: 'id' },
        onUpdate: 'CASCADE',
        onDelete: 'CASCADE',
      },
      file_name: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      media_type: { type: DataTypes.STRING(32), allowNull: false },
      width: { type: DataTypes.INTEGER, allowNull: false },
      height: { type: DataTypes.INTEGER, allowNull: false },
      bytes: { type: DataTypes.INTEGER, allowNull: false },
      caption: { type: DataTypes.STRING(300), allowNull: true },
      credit: { type: DataTypes.STRING(200), allowNull: true },
      uploaded_by: { type: DataTypes.INTEGER, allowNull: true },
      ...timestamps,
    });
    await queryInterface.addIndex('photos', ['taxon_id'], { name: 'photos_taxon' });
  },
  async down({ context: { queryInterface } }) {
    await queryInterface.dropTable('photos');
    await queryInterface.dropTable('audit_entries');
  },
};
