/**
 * The ranking baseline for the benchmark: the engine's scoring model written as one indexed SQLite
 * query over a (taxon, trait, value) table, so the typed-array engine is compared with the way a
 * database-backed service would compute the same thing.
 *
 * Invariant: for the same matrix and observations the query returns the engine's scores (log
 * posterior up to a constant), conflicts and top candidates; the benchmark checks that it does.
 */
import sqlite3 from 'sqlite3';
import { MODEL, RangeField, toCentimetres, ValueStatus, type CompiledMatrix, type Observation } from '@shared/engine';

const WEIGHT: Record<number, number> = {
  [ValueStatus.Usual]: MODEL.usualWeight,
  [ValueStatus.Occasional]: MODEL.occasionalWeight,
  [ValueStatus.Rare]: MODEL.rareWeight,
};

export interface SqlRow {
  taxon: number;
  score: number;
  conflicts: number;
}

function run(db: sqlite3.Database, sql: string, params: unknown[] = []): Promise<void> {
  return new Promise((resolve, reject) => db.run(sql, params, (error) => (error ? reject(error) : resolve())));
}

export function all<T>(db: sqlite3.Database, sql: string, params: unknown[] = []): Promise<T[]> {
  return new Promise((resolve, reject) => db.all(sql, params, (error, rows) => (error ? reject(error) : resolve(rows as T[]))));
}

/**
 * Builds the tables in an in-memory database: `cells` holds one row per coded value with its
 * frequency weight, `cellinfo` one row per (taxon, trait) with its status, total weight and range.
 * Rows go in through json_each, one statement per trait, inside one transaction.
 */
export async function buildSqliteBaseline(compiled: CompiledMatrix): Promise<sqlite3.Database> {
  const db = new sqlite3.Database(':memory:');
  await run(db, 'PRAGMA journal_mode = OFF');
  await run(db, 'PRAGMA synchronous = OFF');
  await run(db, 'CREATE TABLE taxa (taxon INTEGER PRIMARY KEY, logprior REAL NOT NULL)');
  await run(db, 'CREATE TABLE cells (taxon INTEGER NOT NULL, trait INTEGER NOT NULL, value INTEGER NOT NULL, weight REAL NOT NULL)');
  await run(
    db,
    'CREATE TABLE cellinfo (taxon INTEGER NOT NULL, trait INTEGER NOT NULL, status INTEGER NOT NULL, total REAL, min REAL, low REAL, high REAL, max REAL)',
  );
  await run(db, 'BEGIN');
  const n = compiled.taxonCount;
  let total = 0;
  for (const weight of compiled.priorWeight) total += weight;
  const priors = Array.from(compiled.priorWeight, (weight, t) => [t, Math.log(weight / total)]);
  await run(db, 'INSERT INTO taxa SELECT value ->> 0, value ->> 1 FROM json_each(?)', [JSON.stringify(priors)]);
  for (const trait of compiled.traits) {
    const cellRows: number[][] = [];
    const infoRows: Array<Array<number | null>> = [];
    const k = trait.answerCount;
    for (let t = 0; t < n; t++) {
      const pattern = compiled.cellPattern[trait.index * n + t];
      const status = pattern === 0 ? 0 : pattern === 1 ? 1 : 2;
      if (trait.kind === 'numeric') {
        const block = trait.numericIndex * 4 * n;
        const field = (f: number): number | null => (status === 2 ? compiled.ranges[block + f * n + t] : null);
        infoRows.push([t, status, null, field(RangeField.Min), field(RangeField.Low), field(RangeField.High), field(RangeField.Max)]);
        continue;
      }
      let weightSum = 0;
      if (status === 2) {
        for (let v = 0; v < k; v++) {
          const weight = WEIGHT[compiled.valueStatus[trait.likBase + pattern * k + v]];
          if (weight === undefined) continue;
          cellRows.push([t, v, weight]);
          weightSum += weight;
        }
      }
      infoRows.push([t, status, weightSum, null, null, null, null]);
    }
    if (cellRows.length > 0) {
      await run(db, 'INSERT INTO cells SELECT value ->> 0, ?, value ->> 1, value ->> 2 FROM json_each(?)', [trait.index, JSON.stringify(cellRows)]);
    }
    await run(
      db,
      'INSERT INTO cellinfo SELECT value ->> 0, ?, value ->> 1, value ->> 2, value ->> 3, value ->> 4, value ->> 5, value ->> 6 FROM json_each(?)',
      [trait.index, JSON.stringify(infoRows)],
    );
  }
  await run(db, 'COMMIT');
  await run(db, 'CREATE INDEX cells_by_trait_value ON cells (trait, value, taxon)');
  await run(db, 'CREATE INDEX cellinfo_by_trait ON cellinfo (trait, taxon)');
  await run(db, 'ANALYZE');
  return db;
}

/** The ranking query and its parameters: per-observation log-likelihood subqueries summed per taxon. */
export function rankingQuery(compiled: CompiledMatrix, observations: readonly Observation[], limit: number): { sql: string; params: unknown[] } {
  const parts: string[] = ['SELECT taxon, logprior AS ll, 0 AS c FROM taxa'];
  const params: unknown[] = [];
  for (const observation of observations) {
    const trait = compiled.traits[compiled.traitIndexByCode.get(observation.trait) as number];
    const e = trait.errorRate;
    if ('value' in observation) {
      const x = toCentimetres(observation.value, observation.unit ?? 'cm');
      parts.push(
        `SELECT taxon,
           ln(CASE status WHEN 0 THEN ${MODEL.unknownNumericScore} WHEN 1 THEN ?
                WHEN 2 THEN CASE WHEN ? BETWEEN low AND high THEN ${MODEL.typicalScore} WHEN ? BETWEEN min AND max THEN ${MODEL.extremeScore} ELSE ? END END) AS ll,
           CASE WHEN status = 1 OR (status = 2 AND NOT (? BETWEEN min AND max)) THEN 1 ELSE 0 END AS c
         FROM cellinfo WHERE trait = ?`,
      );
      params.push(e, x, x, e, x, trait.index);
      continue;
    }
    const answers = observation.values.map((value) => (trait.kind === 'count' ? Number(value) - trait.countMin : trait.answerCodes.indexOf(value)));
    const k = trait.answerCount;
    const spread = e / Math.max(1, k - 1);
    const size = answers.length;
    parts.push(
      `SELECT ci.taxon AS taxon,
         ln(CASE ci.status WHEN 0 THEN ${size / k} WHEN 1 THEN ${size * spread}
              ELSE min(1.0, ${1 - e} * coalesce(m.w, 0) / ci.total + ${spread} * (${size} - coalesce(m.w, 0) / ci.total)) END) AS ll,
         CASE WHEN ci.status = 1 OR (ci.status = 2 AND m.w IS NULL) THEN 1 ELSE 0 END AS c
       FROM cellinfo ci
       LEFT JOIN (SELECT taxon, sum(weight) AS w FROM cells WHERE trait = ? AND value IN (${answers.map(() => '?').join(', ')}) GROUP BY taxon) m ON m.taxon = ci.taxon
       WHERE ci.trait = ?`,
    );
    params.push(trait.index, ...answers, trait.index);
  }
  const sql = `SELECT taxon, score, conflicts FROM (
      SELECT taxon, sum(ll) AS score, sum(c) AS conflicts FROM (${parts.join('\nUNION ALL\n')}) GROUP BY taxon
    ) ORDER BY score DESC, conflicts ASC, taxon ASC LIMIT ${limit}`;
  return { sql, params };
}
