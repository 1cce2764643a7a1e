/**
 * The workbench's entry: sign in with a pasted API key, then a hash router
 * over the screens. The key's role (from /v1/me) decides what shows: a
 * screen offers an action only when the role holds the permission the API
 * asks for it, and the API checks again whatever the page shows.
 */
import { call, forgetKey, ScreenError, storedKey, storeKey } from './api.js';
import { field, h, notice, replace } from './dom.js';
import type { Caller } from './types.js';
import { facilitiesScreen } from './screens/facilities.js';
import { meterDataScreen } from './screens/meter-data.js';
import { benchScreen, loadBench, type BenchData } from './screens/bench.js';
import { savingsScreen } from './screens/savings.js';
import { reportsScreen } from './screens/reports.js';

/** What a screen gets: where to draw, who is calling, and a way to say its title. */
export interface ScreenContext {
  main: HTMLElement;
  caller: Caller;
  can: (permission: string) => boolean;
  title: (text: string) => void;
}

const app = document.getElementById('app')!;

function signInForm(message?: string): void {
  document.title = 'Sign in · mvledger workbench';
  const input = h('input', {
    type: 'password',
    name: 'api-key',
    autocomplete: 'off',
    spellcheck: 'false',
    required: true,
  });
  const form = h(
    'form',
    { class: 'sign-in', 'aria-labelledby': 'sign-in-title' },
    h('h1', { id: 'sign-in-title' }, 'mvledger workbench'),
    h(
      'p',
      {},
      'Paste an API key. It stays in this browser tab only (sessionStorage) and is forgotten when the tab closes.',
    ),
    message ? notice('error', message) : null,
    field('API key', input, 'A key looks like mvl_<id>_<secret>; ask your administrator for one.'),
    h('button', { type: 'submit' }, 'Sign in'),
  );
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    storeKey(input.value.trim());
    void start();
  });
  replace(app, h('main', { id: 'main', class: 'narrow' }, form));
  input.focus();
}

function navigation(caller: Caller): HTMLElement {
  const link = (href: string, text: string) => h('a', { href }, text);
  return h(
    'header',
    { class: 'masthead' },
    h(
      'a',
      {
        class: 'skip',
        href: '#main',
        // The hash is the router's: move focus without changing it.
        onclick: (event: Event) => {
          event.preventDefault();
          document.getElementById('main')?.focus();
        },
      },
      'Skip to content',
    ),
    h('p', { class: 'brand' }, 'mvledger workbench'),
    h(
      'nav',
      { 'aria-label': 'Screens' },
      h(
        'ul',
        {},
        h('li', {}, link('#/', 'Facilities and meters')),
        h('li', {}, link('#/reports', 'Reports and statements')),
      ),
    ),
    h(
      'p',
      { class: 'who' },
      `${caller.organisation.name} · ${caller.key.name} (${caller.key.role}) `,
      h(
        'button',
        {
          type: 'button',
          class: 'link',
          onclick: () => {
            current = null;
            forgetKey();
            location.hash = '';
            signInForm();
          },
        },
        'Sign out',
      ),
    ),
  );
}

function markCurrent(): void {
  const current = location.hash || '#/';
  for (const a of document.querySelectorAll<HTMLAnchorElement>('nav a')) {
    const target = a.getAttribute('href')!;
    const here = target === '#/' ? current === '#/' || current.startsWith('#/meter') : current.startsWith(target);
    if (here) a.setAttribute('aria-current', 'page');
    else a.removeAttribute('aria-current');
  }
}

/** The meter screen a hash names, if it names one. */
function meterRoute(hash: string): { id: string; screen: 'data' | 'bench' | 'savings' } | null {
  const meter = /^\/meter\/([^/]+)\/(data|bench|savings)$/.exec(hash.replace(/^#/, '') || '/');
  return meter ? { id: decodeURIComponent(meter[1]!), screen: meter[2] as 'data' | 'bench' | 'savings' } : null;
}

/** The first screen's data when it was read beside the key check; taken by the first route() only. */
let opening: { hash: string; data: Promise<BenchData> } | null = null;

/** Which route() call is the current one: a screen still loading when the hash moves on is never shown. */
let routeCount = 0;

async function route(context: ScreenContext): Promise<void> {
  const generation = ++routeCount;
  const current = () => generation === routeCount;
  const hash = location.hash.replace(/^#/, '') || '/';
  const meter = meterRoute(hash);
  markCurrent();
  context.main.replaceChildren(h('p', { class: 'loading', role: 'status' }, 'Loading…'));
  // The screen draws into a view of its own, put in place only while its route is still the current one.
  const view = h('div', { class: 'view' });
  const screen: ScreenContext = { ...context, main: view, title: (text) => current() && context.title(text) };
  try {
    if (meter) {
      if (meter.screen === 'data') await meterDataScreen(screen, meter.id);
      else if (meter.screen === 'bench') await benchScreen(screen, meter.id, early(location.hash));
      else await savingsScreen(screen, meter.id);
    } else if (hash === '/reports') await reportsScreen(screen);
    else await facilitiesScreen(screen);
    if (current()) replace(context.main, view);
  } catch (error) {
    if (!current()) return;
    const detail =
      error instanceof ScreenError
        ? `${error.problem.title}: ${error.problem.detail}`
        : 'something went wrong drawing this screen';
    replace(context.main, h('h1', {}, 'This screen could not be shown'), notice('error', detail));
    if (!(error instanceof ScreenError)) throw error;
  } finally {
    opening = null;
  }
}

function early(hash: string): Promise<BenchData> | undefined {
  const taken = opening?.hash === hash ? opening.data : undefined;
  opening = null;
  return taken;
}

let current: ScreenContext | null = null;
window.addEventListener('hashchange', () => {
  const context = current;
  if (context) void route(context).then(() => context.main.focus({ preventScroll: true }));
});

async function start(): Promise<void> {
  if (!storedKey()) return signInForm();
  // The key check and the bench's own reads go out together (a refused key is refused on those too, and they are dropped).
  const checking = call<Caller>('/v1/me');
  const meter = meterRoute(location.hash);
  if (meter?.screen === 'bench') {
    const data = loadBench(meter.id);
    data.catch(() => undefined); // its refusal is shown when the screen awaits it, or dropped with a refused key
    opening = { hash: location.hash, data };
  }
  const me = await checking;
  if (!me.ok) {
    opening = null;
    forgetKey();
    return signInForm(
      me.status === 401 ? 'That key was not accepted: check it and paste it again.' : me.problem.detail,
    );
  }
  const caller = me.body;
  // Opening on a bench: draw the masthead with the bench in one layout, not a frame of its own first.
  if (opening)
    await opening.data.then(
      () => undefined,
      () => undefined,
    );
  const main = h('main', { id: 'main', tabindex: '-1' });
  replace(app, navigation(caller), main);
  const context: ScreenContext = {
    main,
    caller,
    can: (permission) => caller.permissions.includes(permission),
    title: (text) => {
      document.title = `${text} · mvledger workbench`;
    },
  };
  current = context;
  await route(context);
}

// The benchmark (test/bench/workbench.ts) reads when the script began to run.
performance.mark('workbench:script');
void start();
