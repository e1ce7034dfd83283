import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Role } from '../auth/principal';

/** What a one-time link is for. */
export type OneTimePurpose = 'password-reset' | 'invitation';

/** Users, sessions, one-time links and sign-in throttles, defined per Sequelize instance. */
export function defineAccountModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class UserRecord extends Model<InferAttributes<UserRecord>, InferCreationAttributes<UserRecord>> {
    declare id: CreationOptional<number>;
    /** stored lower-cased, so look-ups are case-insensitive */
    declare email: string;
    declare displayName: string;
    /** `scrypt$N$r$p$salt$hash`, salt and hash base64url */
    declare passwordHash: string;
    declare role: Role;
    declare active: CreationOptional<boolean>;
    declare lastSignInAt: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  UserRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
      displayName: { type: DataTypes.STRING(120), allowNull: false },
      passwordHash: { type: DataTypes.STRING(255), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      lastSignInAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'users', modelName: 'User' },
  );

  class SessionRecord extends Model<InferAttributes<SessionRecord>, InferCreationAttributes<SessionRecord>> {
    declare id: CreationOptional<number>;
    declare userId: number;
    /** SHA-256 of the bearer token, hex; the token itself is never stored */
    declare tokenHash: string;
    declare expiresAt: Date;
    declare revokedAt: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  SessionRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      userId: { type: DataTypes.INTEGER, allowNull: false },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'sessions', modelName: 'Session' },
  );

  class OneTimeTokenRecord extends Model<InferAttributes<OneTimeTokenRecord>, InferCreationAttributes<OneTimeTokenRecord>> {
    declare id: CreationOptional<number>;
    declare purpose: OneTimePurpose;
    declare tokenHash: string;
    declare email: string;
    /** the account a reset is for; null for invitations */
    declare userId: number | null;
    /** the role an invitation grants; null for resets */
    declare role: Role | null;
    declare createdBy: number | null;
    declare expiresAt: Date;
    declare usedAt: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  OneTimeTokenRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      purpose: { type: DataTypes.STRING(24), allowNull: false },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      email: { type: DataTypes.STRING(254), allowNull: false },
      userId: { type: DataTypes.INTEGER, allowNull: true },
      role: { type: DataTypes.STRING(16), allowNull: true },
      createdBy: { type: DataTypes.INTEGER, allowNull: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      usedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'one_time_tokens', modelName: 'OneTimeToken' },
  );

  /** Failed sign-ins per e-mail address, whether or not an account has that address. */
  class SignInThrottleRecord extends Model<InferAttributes<SignInThrottleRecord>, InferCreationAttributes<SignInThrottleRecord>> {
    declare email: string;
    declare failures: number;
    declare lockedUntil: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  SignInThrottleRecord.init(
    {
      email: { type: DataTypes.STRING(254), primaryKey: true },
      failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lockedUntil: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'sign_in_throttles', modelName: 'SignInThrottle' },
  );

  SessionRecord.belongsTo(UserRecord, { foreignKey: 'userId', as: 'user' });

  return { User: UserRecord, Session: SessionRecord, OneTimeToken: OneTimeTokenRecord, SignInThrottle: SignInThrottleRecord };
}

export type AccountModels = ReturnType<typeof defineAccountModels>;
