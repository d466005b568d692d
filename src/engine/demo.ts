import fs from 'node:fs';
import machineJson from '../../fixtures/demo/machine.json' with { type: 'json' };
import { UserError } from '../model/errors.js';
import type { FreqUnit } from '../model/units.js';
import { initMachine, openMachine, type Machine } from './index.js';

/**
 * The demo machine: fixtures/demo/machine.json replayed through the engine, step
 * by step, with the authors and times written there (so the demo store is the
 * same on every computer). The plants' physics and derivations live in the
 * fixture; scripts/demo_reference.py checks them and computes reference results.
 */

/** Where `loopledger demo` puts its store unless told otherwise. */
export const DEMO_STORE = 'demo.loopledger.db';

interface Stamp { readonly at: string; readonly by: string; readonly note: string }
type Step = Stamp & { readonly loop: string } & (
  | { readonly do: 'loop'; readonly plant: string; readonly variant?: string; readonly inner?: string; readonly sample_rate_hz?: number }
  | { readonly do: 'plant'; readonly plant: string; readonly variant?: string }
  | { readonly do: 'spec'; readonly reqs: readonly string[] }
  | { readonly do: 'comp'; readonly blocks: readonly string[] }
  | { readonly do: 'revert'; readonly to: number }
);

/** The fixture's shape (only what the builder reads). */
export interface DemoFixture {
  readonly name: string;
  readonly created: string;
  readonly unit: FreqUnit;
  readonly plants: Readonly<Record<string, { readonly text: string }>>;
  readonly axes: readonly (Stamp & { readonly name: string })[];
  readonly history: readonly Step[];
}

/** The demo fixture as shipped. */
export const DEMO: DemoFixture = machineJson as unknown as DemoFixture;

/** What `ensureDemo` did. */
export interface DemoOutcome {
  readonly machine: Machine;
  readonly created: boolean;
}

/**
 * Opens the demo store at `path`, building it first when no file is there. An
 * existing file is reused only if it is a loopledger store (openMachine refuses
 * anything else and changes nothing). The build goes to a temporary file that
 * is renamed into place at the end, so an interrupted build never leaves a
 * half-made store behind.
 */
export async function ensureDemo(path: string, fixture: DemoFixture = DEMO): Promise<DemoOutcome> {
  if (fs.existsSync(path)) return { machine: openMachine(path), created: false };
  const tmp = `${path}.building-${process.pid}`;
  removeStore(tmp);
  try {
    const m = await buildDemo(tmp, fixture);
    m.close();
    fs.renameSync(tmp, path);
  } finally {
    removeStore(tmp);
  }
  return { machine: openMachine(path), created: true };
}

/** Builds the demo machine into a new store at `path` and returns it open. */
export async function buildDemo(path: string, fixture: DemoFixture = DEMO): Promise<Machine> {
  let clock = new Date(fixture.created);
  const m = initMachine(path, { name: fixture.name, unit: fixture.unit }, { now: () => clock });
  try {
    for (const a of fixture.axes) {
      clock = new Date(a.at);
      m.addAxis(a.name, { note: a.note, author: a.by });
    }
    // Stable sort: steps of one loop keep their file order when times tie.
    const steps = [...fixture.history].sort((x, y) => x.at.localeCompare(y.at));
    for (const s of steps) {
      clock = new Date(s.at);
      await applyStep(m, s, fixture);
    }
  } catch (e) {
    m.close();
    throw e;
  }
  return m;
}

async function applyStep(m: Machine, s: Step, fixture: DemoFixture): Promise<void> {
  const who = { note: s.note, author: s.by };
  const plant = (id: string) => {
    const p = fixture.plants[id];
    if (!p) throw new UserError(`demo fixture: step at ${s.at} names plant '${id}', which is not under "plants"`);
    return p.text;
  };
  switch (s.do) {
    case 'loop':
      await m.addLoop(s.loop, { plant: plant(s.plant), ...(s.variant ? { variant: s.variant } : {}), inner: s.inner ?? null, sampleRateHz: s.sample_rate_hz ?? null, ...who });
      return;
    case 'plant':
      await m.setPlant(s.loop, plant(s.plant), { ...(s.variant ? { variant: s.variant } : {}), ...who });
      return;
    case 'spec':
      await m.setRequirements(s.loop, s.reqs, who);
      return;
    case 'comp':
      await m.setCompensator(s.loop, s.blocks, who);
      return;
    case 'revert':
      await m.revert(s.loop, s.to, who);
      return;
  }
}

/** Removes a store file and its SQLite companions, if any. */
function removeStore(path: string): void {
  for (const f of [path, `${path}-wal`, `${path}-shm`, `${path}-journal`]) fs.rmSync(f, { force: true });
}
