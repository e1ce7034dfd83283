import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Cell, PlantPart, Season, TraitKind } from '@shared/engine';

/** The working matrix (traits, their values, taxa, cells, inseparable pairs) and the audit log of its changes. */
export function defineMatrixModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class TraitRecord extends Model<InferAttributes<TraitRecord>, InferCreationAttributes<TraitRecord>> {
    declare code: string;
    declare label: string;
    declare part: PlantPart;
    declare kind: TraitKind;
    declare unit: 'cm' | null;
    declare season: Season;
    declare ease: number;
    declare errorRate: number;
    declare help: string | null;
    declare appliesWhen: Record<string, string[]> | null;
    declare countRange: { min: number; max: number } | null;
    declare position: CreationOptional<number>;
    declare retired: CreationOptional<boolean>;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  TraitRecord.init(
    {
      code: { type: DataTypes.STRING(64), primaryKey: true },
      label: { type: DataTypes.STRING(200), allowNull: false },
      part: { type: DataTypes.STRING(32), allowNull: false },
      kind: { type: DataTypes.STRING(16), allowNull: false },
      unit: { type: DataTypes.STRING(8), allowNull: true },
      season: { type: DataTypes.STRING(16), allowNull: false },
      ease: { type: DataTypes.FLOAT, allowNull: false },
      errorRate: { type: DataTypes.FLOAT, allowNull: false },
      help: { type: DataTypes.TEXT, allowNull: true },
      appliesWhen: { type: DataTypes.JSON, allowNull: true },
      countRange: { type: DataTypes.JSON, allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'traits', modelName: 'Trait' },
  );

  class TraitValueRecord extends Model<InferAttributes<TraitValueRecord>, InferCreationAttributes<TraitValueRecord>> {
    declare id: CreationOptional<number>;
    declare traitCode: string;
    declare code: string;
    declare label: string;
    declare definition: string | null;
    declare illustration: string | null;
    declare synonyms: string[] | null;
    declare position: CreationOptional<number>;
    declare retired: CreationOptional<boolean>;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  TraitValueRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      traitCode: { type: DataTypes.STRING(64), allowNull: false },
      code: { type: DataTypes.STRING(64), allowNull: false },
      label: { type: DataTypes.STRING(200), allowNull: false },
      definition: { type: DataTypes.TEXT, allowNull: true },
      illustration: { type: DataTypes.STRING(200), allowNull: true },
      synonyms: { type: DataTypes.JSON, allowNull: true },
      position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'trait_values', modelName: 'TraitValue' },
  );

  class TaxonRecord extends Model<InferAttributes<TaxonRecord>, InferCreationAttributes<TaxonRecord>> {
    declare id: string;
    declare scientificName: string;
    declare authority: string;
    declare family: string;
    declare commonNames: string[];
    declare status: 'native' | 'naturalised' | 'introduced' | null;
    declare prior: CreationOptional<number>;
    declare source: string | null;
    declare habitat: string | null;
    declare range: string | null;
    declare cautions: string[] | null;
    declare lookAlikes: string[] | null;
    declare retired: CreationOptional<boolean>;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  TaxonRecord.init(
    {
      id: { type: DataTypes.STRING(120), primaryKey: true },
      scientificName: { type: DataTypes.STRING(200), allowNull: false, unique: true },
      authority: { type: DataTypes.STRING(200), allowNull: false },
      family: { type: DataTypes.STRING(100), allowNull: false },
      commonNames: { type: DataTypes.JSON, allowNull: false },
      status: { type: DataTypes.STRING(16), allowNull: true },
      prior: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 1 },
      source: { type: DataTypes.TEXT, allowNull: true },
      habitat: { type: DataTypes.TEXT, allowNull: true },
      range: { type: DataTypes.TEXT, allowNull: true },
      cautions: { type: DataTypes.JSON, allowNull: true },
      lookAlikes: { type: DataTypes.JSON, allowNull: true },
      retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'taxa', modelName: 'Taxon' },
  );

  class CellRecord extends Model<InferAttributes<CellRecord>, InferCreationAttributes<CellRecord>> {
    declare id: CreationOptional<number>;
    declare taxonId: string;
    declare traitCode: string;
    declare value: Cell;
    /** bumped on every change; a write must name the version it read (optimistic locking) */
    declare version: CreationOptional<number>;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  CellRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxonId: { type: DataTypes.STRING(120), allowNull: false },
      traitCode: { type: DataTypes.STRING(64), allowNull: false },
      value: { type: DataTypes.JSON, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'cells', modelName: 'Cell' },
  );

  class InseparablePairRecord extends Model<InferAttributes<InseparablePairRecord>, InferCreationAttributes<InseparablePairRecord>> {
    declare id: CreationOptional<number>;
    declare taxonA: string;
    declare taxonB: string;
    declare reason: string;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  InseparablePairRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxonA: { type: DataTypes.STRING(120), allowNull: false },
      taxonB: { type: DataTypes.STRING(120), allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'inseparable_pairs', modelName: 'InseparablePair' },
  );

  class AuditEntryRecord extends Model<InferAttributes<AuditEntryRecord>, InferCreationAttributes<AuditEntryRecord>> {
    declare id: CreationOptional<number>;
    declare actorId: number | null;
    declare actorEmail: string | null;
    /** `taxon`, `trait`, `trait-value`, `cell`, `import` or `edition` */
    declare entity: string;
    /** the entity's key: a taxon id, a trait code, `trait/value`, `taxon/trait`, an edition number */
    declare entityKey: string;
    declare action: string;
    declare before: unknown;
    declare after: unknown;
    declare reason: string;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  AuditEntryRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      actorId: { type: DataTypes.INTEGER, allowNull: true },
      actorEmail: { type: DataTypes.STRING(200), allowNull: true },
      entity: { type: DataTypes.STRING(32), allowNull: false },
      entityKey: { type: DataTypes.STRING(200), allowNull: false },
      action: { type: DataTypes.STRING(32), allowNull: false },
      before: { type: DataTypes.JSON, allowNull: true },
      after: { type: DataTypes.JSON, allowNull: true },
      reason: { type: DataTypes.TEXT, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'audit_entries', modelName: 'AuditEntry' },
  );

  TraitRecord.hasMany(TraitValueRecord, { foreignKey: 'traitCode', as: 'values' });
  TraitValueRecord.belongsTo(TraitRecord, { foreignKey: 'traitCode' });
  TaxonRecord.hasMany(CellRecord, { foreignKey: 'taxonId', as: 'cells' });
  CellRecord.belongsTo(TaxonRecord, { foreignKey: 'taxonId' });
  CellRecord.belongsTo(TraitRecord, { foreignKey: 'traitCode' });

  return {
    Trait: TraitRecord,
    TraitValue: TraitValueRecord,
    Taxon: TaxonRecord,
    Cell: CellRecord,
    InseparablePair: InseparablePairRecord,
    AuditEntry: AuditEntryRecord,
  };
}

export type MatrixModels = ReturnType<typeof defineMatrixModels>;
