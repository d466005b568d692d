import fs from 'node:fs';
import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import type { FreqUnit } from '../model/units.js';
import { openStore, type Store } from '../store/open.js';
import { StoreSql } from '../store/queries.js';
import { checkLoops } from './check.js';
import { findLoop, osUser, type Core } from './core.js';
import { diffRevisions } from './diff.js';
import { dumpMachine } from './dump.js';
import type { Machine, OpenOptions } from './index.js';
import { makeCompensator, parseBlocks, parsePlant, parseRequirements } from './inputs.js';
import { loadInto, readDump } from './load.js';
import { applyChange, createLoop } from './mutate.js';
import { checkName, parseLoopRef } from './names.js';
import { compensatorText, editChange, parseEdit } from './edit.js';
import { effectivePlants } from './plants.js';
import { DEFAULT_VARIANT, requirementKey, withCompensator, withoutPlant, withoutRequirements, withPlant, withRequirements } from './state.js';
import type {
  AxisInfo, BlockInput, ChangeOptions, ChangeOutcome, CheckReport, EffectivePlants, EffectivePlantsOptions, LoopDetail, LoopDiff, LoopEdit, LoopInfo,
  MachineSettings, OverviewRow, RequirementInput, Revision, RevisionInfo, WhatIfEdit, WhatIfResult,
} from './types.js';
import { listAxes, listLoops, loopDetail, loopInfo, loopLog, loopRevision, overview } from './views.js';
import { whatIf } from './whatif.js';

/** The engine over one open store; see the Machine interface in index.ts for what each method promises. */
class MachineImpl implements Machine {
  private readonly core: Core;
  private unitCache: FreqUnit | null = null;

  constructor(private readonly store: Store, opts: OpenOptions) {
    const sql = new StoreSql(store.db);
    const clock = opts.now ?? (() => new Date());
    const defaultAuthor = opts.author ?? osUser();
    this.core = {
      sql, path: store.path, schemaVersion: store.schemaVersion,
      unit: () => (this.unitCache ??= this.settings().unit),
      author: (given) => (given !== undefined && given.trim() !== '' ? given.trim() : defaultAuthor),
      now: () => clock().toISOString(),
    };
  }

  get path(): string {
    return this.store.path;
  }

  settings(): MachineSettings {
    const m = this.core.sql.machine();
    if (!m) throw new UserError(`${this.store.path} is a loopledger store that was never initialised; run 'loopledger init'`);
    return { name: m.name, unit: m.unit, createdAt: m.created_at, schemaVersion: this.store.schemaVersion };
  }

  addAxis(name: string, opts: { note?: string; author?: string } = {}): AxisInfo {
    checkName(name, 'axis');
    this.core.sql.writeTx(() => {
      if (this.core.sql.axisByName(name)) throw new UserError(`axis '${name}' already exists`);
      this.core.sql.insertAxis({ name, note: opts.note ?? '', author: this.core.author(opts.author), created_at: this.core.now() });
    });
    return listAxes(this.core).find((a) => a.name === name)!;
  }

  listAxes(): AxisInfo[] {
    return listAxes(this.core);
  }

  async addLoop(ref: string, opts: { plant: string; variant?: string; inner?: string | null; sampleRateHz?: number | null; note?: string; author?: string }): Promise<ChangeOutcome> {
    requireAxisOf(this.core, ref);
    const plant = await parsePlant(opts.plant);
    return createLoop(this.core, ref, { plant, variant: opts.variant ?? DEFAULT_VARIANT, inner: opts.inner ?? null, sampleRateHz: opts.sampleRateHz ?? null }, opts);
  }

  listLoops(): LoopInfo[] {
    return listLoops(this.core);
  }

  loopInfo(ref: string): LoopInfo {
    return loopInfo(this.core, ref);
  }

  revision(ref: string, number?: number): Revision {
    return loopRevision(this.core, ref, number);
  }

  async setPlant(ref: string, text: string, opts: ChangeOptions & { variant?: string } = {}): Promise<ChangeOutcome> {
    findLoop(this.core, ref);
    const variant = checkName(opts.variant ?? DEFAULT_VARIANT, 'variant');
    const plant = await parsePlant(text);
    return applyChange(this.core, ref, opts, {
      kind: 'plant',
      apply: (s) => ({ state: withPlant(s, variant, plant), summary: `plant ${variant}: ${plant.text}` }),
    });
  }

  async dropPlant(ref: string, variant: string, opts: ChangeOptions = {}): Promise<ChangeOutcome> {
    return applyChange(this.core, ref, opts, {
      kind: 'plant',
      apply: (s, r) => ({ state: withoutPlant(s, variant, r), summary: `plant ${variant} dropped` }),
    });
  }

  async setRequirements(ref: string, reqs: readonly RequirementInput[], opts: ChangeOptions = {}): Promise<ChangeOutcome> {
    findLoop(this.core, ref);
    const parsed = parseRequirements(reqs, this.core.unit());
    const keys = parsed.map(requirementKey);
    const twice = keys.find((k, i) => keys.indexOf(k) !== i);
    if (twice !== undefined) throw new UserError(`two requirements for ${twice} in one change; give each metric and direction once`);
    return applyChange(this.core, ref, opts, {
      kind: 'spec',
      apply: (s) => ({ state: withRequirements(s, parsed), summary: `spec ${parsed.map((r) => r.text).join(' ')}` }),
    });
  }

  async dropRequirements(ref: string, key: string, opts: ChangeOptions = {}): Promise<ChangeOutcome> {
    return applyChange(this.core, ref, opts, {
      kind: 'spec',
      apply: (s, r) => ({ state: withoutRequirements(s, key, r), summary: `spec dropped ${key.trim().toLowerCase()}` }),
    });
  }

  async setCompensator(ref: string, blocks: readonly BlockInput[], opts: ChangeOptions & { ideal?: boolean } = {}): Promise<ChangeOutcome> {
    findLoop(this.core, ref);
    const unit = this.core.unit();
    const comp = makeCompensator(await parseBlocks(blocks, unit), opts.ideal === true, unit);
    return applyChange(this.core, ref, opts, {
      kind: 'comp',
      apply: (s) => ({ state: withCompensator(s, comp), summary: `comp ${compensatorText(comp, unit)}` }),
    });
  }

  async applyEdit(ref: string, edit: LoopEdit, opts: ChangeOptions = {}): Promise<ChangeOutcome> {
    findLoop(this.core, ref);
    const unit = this.core.unit();
    return applyChange(this.core, ref, opts, editChange(await parseEdit(edit, unit), unit));
  }

  async revert(ref: string, number: number, opts: ChangeOptions = {}): Promise<ChangeOutcome> {
    const target = loopRevision(this.core, ref, number);
    return applyChange(this.core, ref, opts, { kind: 'revert', apply: () => ({ state: target.state, summary: `revert to revision ${number}` }) });
  }

  log(ref: string): RevisionInfo[] {
    return loopLog(this.core, ref);
  }

  diff(ref: string, a: number, b: number): Promise<LoopDiff> {
    return diffRevisions(this.core, ref, a, b);
  }

  check(refs?: readonly string[]): Promise<CheckReport> {
    return checkLoops(this.core, refs ?? null);
  }

  recheckAll(): Promise<CheckReport> {
    return checkLoops(this.core, null, true);
  }

  overview(): Promise<OverviewRow[]> {
    return overview(this.core);
  }

  loopDetail(ref: string): Promise<LoopDetail> {
    return loopDetail(this.core, ref);
  }

  dataVersion(): number {
    return this.core.sql.dataVersion();
  }

  whatIf(ref: string, edit: WhatIfEdit): Promise<WhatIfResult> {
    return whatIf(this.core, ref, edit);
  }

  effectivePlants(ref: string, opts?: EffectivePlantsOptions): Promise<EffectivePlants> {
    return effectivePlants(this.core, ref, opts);
  }

  parseBlocks(words: readonly string[]): Promise<Block[]> {
    return parseBlocks(words, this.core.unit());
  }

  parseRequirements(words: readonly string[]): Requirement[] {
    return parseRequirements(words, this.core.unit());
  }

  dump(): string {
    return dumpMachine(this.core);
  }

  close(): void {
    if (this.store.db.open) this.store.db.close();
  }
}

/** Fails early (before parsing expressions) when the axis of a new loop does not exist. */
function requireAxisOf(core: Core, ref: string): void {
  const { axis } = parseLoopRef(ref);
  if (!core.sql.axisByName(axis)) throw new UserError(`no axis '${axis}' in this store; add it first with 'loopledger axis add ${axis}'`);
}

/** Opens an existing, initialised store. */
export function openMachine(path: string, opts: OpenOptions = {}): Machine {
  const m = new MachineImpl(openStore(path), opts);
  try {
    m.settings();
  } catch (e) {
    m.close();
    throw e;
  }
  return m;
}

/** Creates a store with its machine settings (or completes a store that has none yet). */
export function initMachine(path: string, settings: { name: string; unit: FreqUnit }, opts: OpenOptions = {}): Machine {
  if (settings.unit !== 'hz' && settings.unit !== 'rad') throw new UserError(`unit '${String(settings.unit)}' is not known; use hz or rad`);
  if (settings.name.trim() === '') throw new UserError('the machine needs a name, e.g. --name "gantry 2"');
  const store = openStore(path, { create: true });
  const m = new MachineImpl(store, opts);
  try {
    const sql = new StoreSql(store.db);
    sql.writeTx(() => {
      const existing = sql.machine();
      if (existing) throw new UserError(`${path} is already a loopledger store (machine '${existing.name}'); nothing was changed`);
      sql.putMachine({ name: settings.name.trim(), unit: settings.unit, created_at: (opts.now ?? (() => new Date()))().toISOString() });
    });
  } catch (e) {
    m.close();
    throw e;
  }
  return m;
}

/** Loads a dump into a new or empty store; everything or nothing is written. */
export async function loadMachine(path: string, dumpText: string, opts: OpenOptions = {}): Promise<Machine> {
  const dump = readDump(dumpText);
  const store = openStore(path, { create: true });
  const m = new MachineImpl(store, opts);
  try {
    await loadInto(new StoreSql(store.db), dump, path, opts.now ?? (() => new Date()));
  } catch (e) {
    m.close();
    throw e;
  }
  return m;
}

/** True when a file exists at `path` (whatever it holds). */
export function storeExists(path: string): boolean {
  return fs.existsSync(path);
}
