import { Router } from 'express';
import { FIELD_LIMITS } from '@shared/engine';
import { currentUser, requireUser } from '../auth/guards';
import { problems } from '../http/problem';
import { idParam } from '../http/request-fields';
import { studyService, type NewStudySet, type StudyDeps, type StudySetChange } from './study-service';
import type { StudySet } from './study-store';

const studySetView = (set: StudySet) => ({ ...set, createdAt: set.createdAt.toISOString(), updatedAt: set.updatedAt.toISOString() });

type Body = Record<string, unknown>;
const bodyOf = (body: unknown): Body => (typeof body === 'object' && body !== null && !Array.isArray(body) ? (body as Body) : {});
const bad = (name: string, reason: string) => problems.invalidInput(`${name} ${reason}.`, [{ name: `/${name}`, reason }]);

function nameField(body: Body): string {
  const value = body['name'];
  if (typeof value !== 'string') throw bad('name', 'must be a string');
  const name = value.trim();
  if (name === '') throw bad('name', 'must not be blank');
  if (name.length > FIELD_LIMITS.studySetName.max) throw bad('name', `must be at most ${FIELD_LIMITS.studySetName.max} characters`);
  return name;
}

/** An optional text field that may be null; blank text is stored as null. */
function textField(body: Body, name: string, max: number): string | null | undefined {
  const value = body[name];
  if (value === undefined || value === null) return value;
  if (typeof value !== 'string') throw bad(name, 'must be a string or null');
  if (value.length > max) throw bad(name, `must be at most ${max} characters`);
  return value.trim() === '' ? null : value.trim();
}

function dateField(body: Body): string | null | undefined {
  const value = body['eventDate'];
  if (value === undefined || value === null) return value;
  const match = typeof value === 'string' ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(value) : null;
  const day = match ? new Date(Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3]))) : undefined;
  if (!match || !day || day.toISOString().slice(0, 10) !== value) throw bad('eventDate', 'must be a calendar day as YYYY-MM-DD, or null');
  return value as string;
}

function sharedField(body: Body): boolean | undefined {
  const value = body['shared'];
  if (value !== undefined && typeof value !== 'boolean') throw bad('shared', 'must be true or false');
  return value;
}

function taxaField(body: Body): string[] | undefined {
  const value = body['taxa'];
  if (value === undefined) return undefined;
  if (!Array.isArray(value)) throw bad('taxa', 'must be a list of taxon ids');
  value.forEach((id, index) => {
    if (typeof id !== 'string') throw problems.invalidInput('Every taxon id must be a string.', [{ name: `/taxa/${index}`, reason: 'must be a string' }]);
  });
  return value as string[];
}

function newStudySet(raw: unknown): NewStudySet {
  const body = bodyOf(raw);
  const taxa = taxaField(body);
  if (taxa === undefined) throw bad('taxa', 'is required');
  return {
    name: nameField(body),
    event: textField(body, 'event', FIELD_LIMITS.studySetEvent.max) ?? null,
    eventDate: dateField(body) ?? null,
    notes: textField(body, 'notes', FIELD_LIMITS.studySetNotes.max) ?? null,
    shared: sharedField(body) ?? false,
    taxa,
  };
}

function studySetChange(raw: unknown): StudySetChange {
  const body = bodyOf(raw);
  const change: StudySetChange = {};
  if (body['name'] !== undefined) change.name = nameField(body);
  const event = textField(body, 'event', FIELD_LIMITS.studySetEvent.max);
  if (event !== undefined) change.event = event;
  const eventDate = dateField(body);
  if (eventDate !== undefined) change.eventDate = eventDate;
  const notes = textField(body, 'notes', FIELD_LIMITS.studySetNotes.max);
  if (notes !== undefined) change.notes = notes;
  const shared = sharedField(body);
  if (shared !== undefined) change.shared = shared;
  const taxa = taxaField(body);
  if (taxa !== undefined) change.taxa = taxa;
  if (Object.keys(change).length === 0) throw problems.invalidInput('Name at least one field to change.', [{ name: '/', reason: 'no fields to change' }]);
  return change;
}

/** Study sets: a coach's species list for an event or class (mounted at /api/v1/study-sets). */
export function studyRoutes(deps: StudyDeps): Router {
  const study = studyService(deps);
  const router = Router();
  const coach = requireUser('coach');
  router.use(requireUser(), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  router.post('/', coach, async (req, res) => {
    const set = await study.create(currentUser(req.principal), newStudySet(req.body));
    res.status(201).location(`/api/v1/study-sets/${set.id}`).json(studySetView(set));
  });

  router.get('/', coach, async (req, res) => {
    res.json({ studySets: (await study.list(currentUser(req.principal))).map(studySetView) });
  });

  router.get('/:id', async (req, res) => {
    res.json(studySetView(await study.get(currentUser(req.principal), idParam(req.params['id']))));
  });

  router.patch('/:id', coach, async (req, res) => {
    res.json(studySetView(await study.change(currentUser(req.principal), idParam(req.params['id']), studySetChange(req.body))));
  });

  router.delete('/:id', coach, async (req, res) => {
    await study.remove(currentUser(req.principal), idParam(req.params['id']));
    res.status(204).end();
  });

  return router;
}
