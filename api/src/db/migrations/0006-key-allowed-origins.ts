import { DataTypes } from 'sequelize';
import type { Step } from '../step';

/** Each partner key's browser origins (CORS); null on keys made before, read as none. */
export const keyAllowedOrigins: Step = {
  name: '0006-key-allowed-origins',
  async up({ context: { queryInterface } }) {
    await queryInterface.addColumn('partner_keys', 'allowed_origins', { type: DataTypes.JSON, allowNull: true });
  },
  async down({ context: { queryInterface } }) {
    await queryInterface.removeColumn('partner_keys', 'allowed_origins');
  },
};
