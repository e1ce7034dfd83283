import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Partner keys and their per-day usage, defined per Sequelize instance. */
export function defineKeyModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class PartnerKeyRecord extends Model<InferAttributes<PartnerKeyRecord>, InferCreationAttributes<PartnerKeyRecord>> {
    declare id: CreationOptional<number>;
    declare ownerId: number;
    declare name: string;
    /** the first characters of the key, shown in lists so owners can tell keys apart */
    declare prefix: string;
    /** SHA-256 of the key, hex; the key itself is shown once and never stored */
    declare keyHash: string;
    declare scopes: string[];
    /** browser origins (`https://app.example`) that may call with this key (CORS); null on older keys, read as none */
    declare allowedOrigins: CreationOptional<string[] | null>;
    declare revokedAt: Date | null;
    declare revokedBy: number | null;
    declare lastUsedAt: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  PartnerKeyRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      ownerId: { type: DataTypes.INTEGER, allowNull: false },
      name: { type: DataTypes.STRING(120), allowNull: false },
      prefix: { type: DataTypes.STRING(16), allowNull: false },
      keyHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      scopes: { type: DataTypes.JSON, allowNull: false },
      allowedOrigins: { type: DataTypes.JSON, allowNull: true },
      revokedAt: { type: DataTypes.DATE, allowNull: true },
      revokedBy: { type: DataTypes.INTEGER, allowNull: true },
      lastUsedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'partner_keys', modelName: 'PartnerKey' },
  );

  class KeyUsageRecord extends Model<InferAttributes<KeyUsageRecord>, InferCreationAttributes<KeyUsageRecord>> {
    declare id: CreationOptional<number>;
    declare keyId: number;
    /** UTC day, YYYY-MM-DD */
    declare day: string;
    declare count: number;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  KeyUsageRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      keyId: { type: DataTypes.INTEGER, allowNull: false },
      day: { type: DataTypes.STRING(10), allowNull: false },
      count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'key_usage', modelName: 'KeyUsage' },
  );

  return { PartnerKey: PartnerKeyRecord, KeyUsage: KeyUsageRecord };
}

export type KeyModels = ReturnType<typeof defineKeyModels>;
