import { Injectable } from '@angular/core';
import { httpResource } from '@angular/common/http';

/** What `GET /api/health` answers. */
export interface HealthReport {
  status: 'ok' | 'degraded';
  version: string;
  database: 'ok' | 'unreachable';
}

function isHealthReport(value: unknown): value is HealthReport {
  if (typeof value !== 'object' || value === null) return false;
  const report = value as Record<string, unknown>;
  return typeof report['status'] === 'string' && typeof report['version'] === 'string' && typeof report['database'] === 'string';
}

@Injectable({ providedIn: 'root' })
export class HealthService {
  /** The server's health, fetched once; `value()` stays undefined while loading or on error. */
  healthResource() {
    return httpResource<HealthReport>(() => '/api/health', {
      parse: (body: unknown) => {
        if (!isHealthReport(body)) throw new Error('The server answered with an unexpected health report.');
        return body;
      },
    });
  }
}
