import { expect } from 'chai';
import { problemFromResponse } from './api-problem';

describe('api problems: a request that never reached the server', () => {
  it('reads a network failure (status 0) as no connection, never as a server fault', () => {
    const problem = problemFromResponse(0, null);
    expect(problem.offline).to.equal(true);
    expect(problem.readable).to.match(/needs a connection/);
    expect(problem.readable).to.not.match(/server ran into a problem/);
  });

  it('reads the Angular service worker’s own 504 (its fetch failed, no body) as no connection', () => {
    // @angular/service-worker answers a failed network fetch with 504 "Gateway Timeout" and no body.
    const problem = problemFromResponse(504, null);
    expect(problem.offline).to.equal(true);
    expect(problem.status).to.equal(0);
  });

  it('keeps a problem+json body the server sent, whatever its status', () => {
    const problem = problemFromResponse(504, { title: 'Upstream timed out', status: 504, detail: 'The mail server did not answer.' });
    expect(problem.offline).to.equal(false);
    expect(problem.readable).to.equal('The mail server did not answer.');
    expect(problemFromResponse(500, undefined).readable).to.equal('The server ran into a problem. Try again in a moment.');
  });
});
