/** Small helpers the study set pages share: links, days and who may keep sets. */
import type { StudySet } from '../../core/api/study-service';

/** Roles whose holders make and keep study sets (the server decides; this only picks the screen). */
export function keepsStudySets(role: string | undefined): boolean {
  return role === 'coach' || role === 'admin';
}

/** The address students open to read a shared set. */
export function shareLink(set: Pick<StudySet, 'id'>): string {
  return new URL(`/study/${set.id}`, window.location.origin).toString();
}

/** "April 17, 2027" for a YYYY-MM-DD day, read as a calendar day (no time zone shift). */
export function eventDay(day: string | null): string | null {
  if (!day) return null;
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  if (!match) return day;
  const date = new Date(Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3])));
  return date.toLocaleDateString('en-US', { month: 'long', day: 'numeric', year: 'numeric', timeZone: 'UTC' });
}

/** A route's `:id` as a study set id, or null when it is not one. */
export function studySetId(text: string | undefined): number | null {
  const id = Number(text);
  return Number.isInteger(id) && id > 0 ? id : null;
}
