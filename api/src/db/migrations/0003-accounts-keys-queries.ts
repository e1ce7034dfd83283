import { DataTypes } from 'sequelize';
import type { Step } from '../step';

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

/** Accounts, sessions, one-time links, sign-in throttles, partner keys with daily usage, and queries on cells. */
export const accountsKeysQueries: Step = {
  name: '0003-accounts-keys-queries',
  async up({ context: { queryInterface } }) {
    await queryInterface.createTable('users', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      display_name: { type: DataTypes.STRING(120), allowNull: false },
      password_hash: { type: DataTypes.STRING(255), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      last_sign_in_at: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });

    await queryInterface.createTable('sessions', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      user_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      revoked_at: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });
    await queryInterface.addIndex('sessions', ['user_id'], { name: 'sessions_user_id' });

    await queryInterface.createTable('one_time_tokens', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      purpose: { type: DataTypes.STRING(24), allowNull: false },
      token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      email: { type: DataTypes.STRING(254), allowNull: false },
      user_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      role: { type: DataTypes.STRING(16), allowNull: true },
      created_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      used_at: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });

    await queryInterface.createTable('sign_in_throttles', {
      email: { type: DataTypes.STRING(254), primaryKey: true },
      failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      locked_until: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });

    await queryInterface.createTable('partner_keys', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      owner_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      name: { type: DataTypes.STRING(120), allowNull: false },
      prefix: { type: DataTypes.STRING(16), allowNull: false },
      key_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      scopes: { type: DataTypes.JSON, allowNull: false },
      revoked_at: { type: DataTypes.DATE, allowNull: true },
      revoked_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
      last_used_at: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });
    await queryInterface.addIndex('partner_keys', ['owner_id'], { name: 'partner_keys_owner_id' });

    await queryInterface.createTable('key_usage', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      key_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'partner_keys', key: 'id' }, onDelete: 'CASCADE' },
      day: { type: DataTypes.STRING(10), allowNull: false },
      count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      ...timestamps,
    });
    await queryInterface.addIndex('key_usage', ['key_id', 'day'], { unique: true, name: 'key_usage_key_day' });

    await queryInterface.createTable('queries', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxon_id: { type: DataTypes.STRING(120), allowNull: false, references: { model: 'taxa', key: 'id' }, onUpdate: 'CASCADE', onDelete: 'CASCADE' },
      trait_code: { type: DataTypes.STRING(64), allowNull: false, references: { model: 'traits', key: 'code' }, onUpdate: 'CASCADE', onDelete: 'CASCADE' },
      note: { type: DataTypes.TEXT, allowNull: false },
      state: { type: DataTypes.STRING(16), allowNull: false },
      raised_by: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      answer: { type: DataTypes.TEXT, allowNull: true },
      evidence: { type: DataTypes.TEXT, allowNull: true },
      answered_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
      outcome: { type: DataTypes.STRING(16), allowNull: true },
      settled_by: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
      settled_at: { type: DataTypes.DATE, allowNull: true },
      ...timestamps,
    });
    await queryInterface.addIndex('queries', ['state'], { name: 'queries_state' });

    await queryInterface.createTable('query_events', {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      query_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'queries', key: 'id' }, onDelete: 'CASCADE' },
      actor_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      action: { type: DataTypes.STRING(16), allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: true },
      ...timestamps,
    });
  },
  async down({ context: { queryInterface } }) {
    for (const table of ['query_events', 'queries', 'key_usage', 'partner_keys', 'sign_in_throttles', 'one_time_tokens', 'sessions', 'users']) {
      await queryInterface.dropTable(table);
    }
  },
};
