import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Photos attached to taxa; the files live in the uploads folder. */
export function definePhotoModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class PhotoRecord extends Model<InferAttributes<PhotoRecord>, InferCreationAttributes<PhotoRecord>> {
    declare id: CreationOptional<number>;
    declare taxonId: string;
    /** random file name inside the uploads folder, e.g. `3f9c…e1.webp` */
    declare fileName: string;
    declare mediaType: 'image/jpeg' | 'image/webp';
    declare width: number;
    declare height: number;
    declare bytes: number;
    declare caption: string | null;
    declare credit: string | null;
    declare uploadedBy: number | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  PhotoRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxonId: { type: DataTypes.STRING(120), allowNull: false },
      fileName: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      mediaType: { type: DataTypes.STRING(32), allowNull: false },
      width: { type: DataTypes.INTEGER, allowNull: false },
      height: { type: DataTypes.INTEGER, allowNull: false },
      bytes: { type: DataTypes.INTEGER, allowNull: false },
      caption: { type: DataTypes.STRING(300), allowNull: true },
      credit: { type: DataTypes.STRING(200), allowNull: true },
      uploadedBy: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'photos', modelName: 'Photo' },
  );

  return { Photo: PhotoRecord };
}

export type PhotoModels = ReturnType<typeof definePhotoModels>;
