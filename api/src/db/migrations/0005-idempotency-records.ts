import { DataTypes } from 'sequelize';
import type { Step } from '../step';

/** The first answer to each Idempotency-Key a caller sent to a creating POST, kept for 24 hours. */
export const idempotencyRecords: Step = {
  name: '0005-idempotency-records',
  async up({ context: { queryInterface } }) {
    await queryInterface.createTable('idempotency_records', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      caller: { type: DataTypes.STRING(40), allowNull: false },
      idempotency_key: { type: DataTypes.STRING(255), allowNull: false },
      fingerprint: { type: DataTypes.STRING(64), allowNull: false },
      status: { type: DataTypes.INTEGER, allowNull: true },
      location: { type: DataTypes.STRING(500), allowNull: true },
      body: { type: DataTypes.JSON, allowNull: true },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      created_at: { type: DataTypes.DATE, allowNull: false },
      updated_at: { type: DataTypes.DATE, allowNull: false },
    });
    await queryInterface.addIndex('idempotency_records', ['caller', 'idempotency_key'], { unique: true, name: 'idempotency_records_caller_key' });
    await queryInterface.addIndex('idempotency_records', ['expires_at'], { name: 'idempotency_records_expires_at' });
  },
  async down({ context: { queryInterface } }) {
    await queryInterface.dropTable('idempotency_records');
  },
};
