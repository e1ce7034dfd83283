import type { Transaction } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { PhotoModels } from './photo-models';

export interface PhotoRow {
  id: number;
  taxonId: string;
  fileName: string;
  mediaType: 'image/jpeg' | 'image/webp';
  width: number;
  height: number;
  bytes: number;
  caption: string | null;
  credit: string | null;
  createdAt: Date;
}

type PhotoInstance = InstanceType<MatrixModels & PhotoModels['Photo']>;

function toRow(record: PhotoInstance): PhotoRow {
  return {
    id: record.id,
    taxonId: record.taxonId,
    fileName: record.fileName,
    mediaType: record.mediaType,
    width: record.width,
    height: record.height,
    bytes: record.bytes,
    caption: record.caption,
    credit: record.credit,
    createdAt: record.createdAt,
  };
}

/** A taxon's photos, oldest first. */
export async function listPhotos(models: MatrixModels & PhotoModels, taxonId: string): Promise<PhotoRow[]> {
  const rows = await models.Photo.findAll({ where: { taxonId }, order: [['id', 'ASC']] });
  return rows.map(toRow);
}

export async function findPhotoByFileName(models: MatrixModels & PhotoModels, fileName: string): Promise<PhotoRow | undefined> {
  const row = await models.Photo.findOne({ where: { fileName } });
  return row ? toRow(row) : undefined;
}

export async function insertPhoto(
  models: MatrixModels & PhotoModels,
  photo: Omit<PhotoRow, 'id' | 'createdAt'> & { uploadedBy: number | null },
  transaction?: Transaction,
): Promise<PhotoRow> {
  const row = await models.Photo.create(photo, { transaction });
  return toRow(row);
}

export async function countPhotos(models: MatrixModels & PhotoModels): Promise<number> {
  return models.Photo.count();
}
