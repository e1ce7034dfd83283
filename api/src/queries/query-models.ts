import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A query moves open → answered → settled; an answered query can be reopened by a new answer only while not settled. */
export type QueryState = 'open' | 'answered' | 'settled';
/** How a settled query ended: the cell kept as it was, or recoded. */
export type QueryOutcome = 'kept' | 'recoded';
export type QueryAction = 'raised' | 'answered' | 'settled' | 'recoded';

/** Queries on doubtful cells and their history, defined per Sequelize instance. */
export function defineQueryModels(sequelize: Sequelize) {
  const common = { sequelize, underscored: true, timestamps: true } as const;

  class QueryRecord extends Model<InferAttributes<QueryRecord>, InferCreationAttributes<QueryRecord>> {
    declare id: CreationOptional<number>;
    declare taxonId: string;
    declare traitCode: string;
    declare note: string;
    declare state: QueryState;
    declare raisedBy: number;
    declare answer: string | null;
    declare evidence: string | null;
    declare answeredBy: number | null;
    declare outcome: QueryOutcome | null;
    declare settledBy: number | null;
    declare settledAt: Date | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  QueryRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      taxonId: { type: DataTypes.STRING(120), allowNull: false },
      traitCode: { type: DataTypes.STRING(64), allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: false },
      state: { type: DataTypes.STRING(16), allowNull: false },
      raisedBy: { type: DataTypes.INTEGER, allowNull: false },
      answer: { type: DataTypes.TEXT, allowNull: true },
      evidence: { type: DataTypes.TEXT, allowNull: true },
      answeredBy: { type: DataTypes.INTEGER, allowNull: true },
      outcome: { type: DataTypes.STRING(16), allowNull: true },
      settledBy: { type: DataTypes.INTEGER, allowNull: true },
      settledAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'queries', modelName: 'Query' },
  );

  class QueryEventRecord extends Model<InferAttributes<QueryEventRecord>, InferCreationAttributes<QueryEventRecord>> {
    declare id: CreationOptional<number>;
    declare queryId: number;
    declare actorId: number;
    declare action: QueryAction;
    declare note: string | null;
    declare createdAt: CreationOptional<Date>;
    declare updatedAt: CreationOptional<Date>;
  }
  QueryEventRecord.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      queryId: { type: DataTypes.INTEGER, allowNull: false },
      actorId: { type: DataTypes.INTEGER, allowNull: false },
      action: { type: DataTypes.STRING(16), allowNull: false },
      note: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { ...common, tableName: 'query_events', modelName: 'QueryEvent' },
  );

  return { Query: QueryRecord, QueryEvent: QueryEventRecord };
}

export type QueryModels = ReturnType<typeof defineQueryModels>;
