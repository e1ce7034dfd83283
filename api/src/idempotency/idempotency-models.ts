import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The first answer to each `Idempotency-Key` a caller sent, defined per Sequelize instance. */
export function defineIdempotencyModels(sequelize: Sequelize) {
  class IdempotencyRecord extends Model<InferAttributes<IdempotencyRecord>, InferCreationAttributes<IdempotencyRecord>> {
    declare id: CreationOptional<number>;
    /** who sent it: `user:<id>` or `key:<id>`; a key is only ever looked up for its own caller */
    declare caller: string;
    /** SHA-256 (hex) of the Idempotency-Key header; the key itself is not stored */
    declare idempotencyKey: string;
    /** SHA-256 (hex) of the method, path, query and body: the same key with another request is refused */
    declare fingerprint: string;
    /** the answer's status; null while the first request is still being handled */
    declare status: number | null;
    declare location: string | null;
    /** the answer's body, encrypted with a key derived from the Idempotency-Key (AES-256-GCM) */
    declare body: unknown;
    declare expiresAt: Date;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  IdempotencyRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      caller: { type: DataTypes.STRING(40), allowNull: false },
      idempotencyKey: { type: DataTypes.STRING(255), allowNull: false },
      fingerprint: { type: DataTypes.STRING(64), allowNull: false },
      status: { type: DataTypes.INTEGER, allowNull: true },
      location: { type: DataTypes.STRING(500), allowNull: true },
      body: { type: DataTypes.JSON, allowNull: true },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, underscored: true, timestamps: true, tableName: 'idempotency_records', modelName: 'IdempotencyRecord' },
  );
  return { IdempotencyRecord };
}

export type IdempotencyModels = ReturnType<typeof defineIdempotencyModels>;
