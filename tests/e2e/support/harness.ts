/**
 * One browser suite's world. Call `browserSuite()` at the top of a `describe`: before the suite it
 * starts the built app (its own in-memory database, an ephemeral loopback port) and Chromium (or skips
 * loudly without it); each test asks for fresh contexts, closed after that test; after the suite the
 * browser and the app stop.
 */
import type { Browser, BrowserContext, BrowserContextOptions, Page } from 'playwright-core';
import { launchBrowser, requireChromium } from './browser';
import { startBuiltApp, type RunningApp } from './server';
import type { CreatedApp } from '../../../api/src/app';

export interface SuiteOptions {
  /** configuration for the app, read when the suite starts (so it may make what it names, e.g. a web root) */
  env?: () => Record<string, string>;
}

export interface BrowserSuite {
  /** the running app's address, e.g. `http://localhost:41234` */
  readonly baseUrl: string;
  /** the app itself, for a look at its database */
  readonly created: CreatedApp;
  readonly browser: Browser;
  /** A new context for the current test, closed when the test ends. */
  newContext(options?: BrowserContextOptions): Promise<BrowserContext>;
  /** A page in a new context for the current test, closed when the test ends. */
  newPage(options?: BrowserContextOptions): Promise<Page>;
  /** A context that outlives one test (a later test goes on where it stopped), closed after the suite. */
  suiteContext(options?: BrowserContextOptions): Promise<BrowserContext>;
}

export function browserSuite(options: SuiteOptions = {}): BrowserSuite {
  let running: RunningApp | undefined;
  let browser: Browser | undefined;
  const perTest: BrowserContext[] = [];
  const perSuite: BrowserContext[] = [];

  const started = <T>(value: T | undefined, what: string): T => {
    if (value === undefined) throw new Error(`the browser suite's ${what} is not started: use it inside a test or hook`);
    return value;
  };

  before(async function () {
    requireChromium(this);
    running = await startBuiltApp(options.env?.() ?? {});
    browser = await launchBrowser();
  });

  afterEach(async () => {
    await Promise.all(perTest.splice(0).map((context) => context.close()));
  });

  after(async () => {
    await Promise.all([...perTest.splice(0), ...perSuite.splice(0)].map((context) => context.close()));
    await browser?.close();
    await running?.stop();
  });

  const suite: BrowserSuite = {
    get baseUrl() {
      return started(running, 'app').baseUrl;
    },
    get created() {
      return started(running, 'app').created;
    },
    get browser() {
      return started(browser, 'browser');
    },
    async newContext(contextOptions) {
      const context = await suite.browser.newContext(contextOptions);
      perTest.push(context);
      return context;
    },
    async newPage(contextOptions) {
      return (await suite.newContext(contextOptions)).newPage();
    },
    async suiteContext(contextOptions) {
      const context = await suite.browser.newContext(contextOptions);
      perSuite.push(context);
      return context;
    },
  };
  return suite;
}
