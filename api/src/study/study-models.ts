import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Study sets: a coach's species list for an event, and the taxa on it. */
export function defineStudyModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class StudySetRecord extends Model<InferAttributes<StudySetRecord>, InferCreationAttributes<StudySetRecord>> {
    declare id: CreationOptional<number>;
    declare name: string;
    declare eventName: string | null;
    /** `YYYY-MM-DD`, the day of the event, no time zone */
    declare eventDate: string | null;
    declare notes: string | null;
    /** shared sets can be read by anyone signed in (the coach's students); only the owner and admins change them */
    declare shared: CreationOptional<boolean>;
    declare ownerId: number;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  StudySetRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      eventName: { type: DataTypes.STRING(200), allowNull: true },
      eventDate: { type: DataTypes.DATEONLY, allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      shared: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ownerId: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'study_sets', modelName: 'StudySet' },
  );

  class StudySetTaxonRecord extends Model<InferAttributes<StudySetTaxonRecord>, InferCreationAttributes<StudySetTaxonRecord>> {
    declare id: CreationOptional<number>;
    declare studySetId: number;
    declare taxonId: string;
    /** 0-based place in the coach's order */
    declare position: number;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  StudySetTaxonRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      studySetId: { type: DataTypes.INTEGER, allowNull: false },
      taxonId: { type: DataTypes.STRING(120), allowNull: false },
      position: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'study_set_taxa', modelName: 'StudySetTaxon' },
  );

  return { StudySet: StudySetRecord, StudySetTaxon: StudySetTaxonRecord };
}

export type StudyModels = ReturnType<typeof defineStudyModels>;
