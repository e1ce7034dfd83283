import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Published editions: immutable, numbered snapshots of the working matrix. */
export function defineEditionModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class EditionRecord extends Model<InferAttributes<EditionRecord>, InferCreationAttributes<EditionRecord>> {
    declare number: number;
    declare title: string;
    declare publishedAt: Date;
    declare publishedBy: string | null;
    declare summary: EditionSummary;
    declare document: unknown;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  EditionRecord.init(
    {
      number: { type: DataTypes.INTEGER, primaryKey: true },
      title: { type: DataTypes.STRING(200), allowNull: false },
      publishedAt: { type: DataTypes.DATE, allowNull: false },
      publishedBy: { type: DataTypes.STRING(120), allowNull: true },
      summary: { type: DataTypes.JSON, allowNull: false },
      document: { type: DataTypes.JSON, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'editions', modelName: 'Edition' },
  );

  return { Edition: EditionRecord };
}

/** What changed from one edition to the next. */
export interface EditionSummary {
  taxaAdded: string[];
  taxaRemoved: string[];
  traitsAdded: string[];
  traitsRemoved: string[];
  /** number of (taxon, trait) cells whose coding differs from the previous edition */
  cellsChanged: number;
  taxonCount: number;
  traitCount: number;
}

export type EditionModels = ReturnType<typeof defineEditionModels>;
