import { Box, Text, useApp, useInput, useStdin } from 'ink';
import { useCallback, useEffect, useMemo, useReducer, useRef, useState } from 'react';
import { act, backspace, clearTyped, editLoaded, proposed, saveDone, typeText, type ActContext, type Effect } from './actions.js';
import { buildFrame } from './build-screen.js';
import { currentScreen, initialState, type DashState } from './dash-state.js';
import { keyNames } from './key-name.js';
import { actionFor } from './keys.js';
import { frameSize } from './layout.js';
import { Lines } from './Lines.js';
import type { DashSource } from './source.js';
import { useDataVersion } from './use-data-version.js';
import { useLiveResult } from './use-live-result.js';
import { useWindowSize } from './use-window-size.js';
import type { CompareVM, LoopDetailVM, OverviewVM } from './view-model.js';

export interface AppProps {
  readonly source: DashSource;
  readonly colour: boolean;
  /** How often to look for changes by other processes. */
  readonly pollMs?: number;
  /** Clock for "5 min ago" (tests pin it). */
  readonly now?: () => number;
}

const errorText = (e: unknown) => (e instanceof Error ? e.message : String(e));

/**
 * The dashboard. State lives in one object changed only by the controller
 * (actions.ts); data comes from the source and is reloaded when the store's
 * data version moves or after our own save; the frame is built by a pure
 * function and drawn line by line.
 */
export function App({ source, colour, pollMs = 1000, now = Date.now }: AppProps) {
  const { exit } = useApp();
  const { isRawModeSupported } = useStdin();
  const win = useWindowSize();
  const size = frameSize(win.columns, win.rows);
  const [state, setState] = useState<DashState>(initialState);
  const stateRef = useRef(state);
  const update = useCallback((f: (s: DashState) => DashState) => {
    stateRef.current = f(stateRef.current);
    setState(stateRef.current);
  }, []);
  const external = useDataVersion(source, pollMs);
  const [own, bumpOwn] = useReducer((x: number) => x + 1, 0);
  const [overview, setOverview] = useState<OverviewVM | null>(null);
  const [detail, setDetail] = useState<LoopDetailVM | null>(null);
  const [compare, setCompare] = useState<CompareVM | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const methods = useMemo(() => source.tuneMethods(), [source]);
  const screen = currentScreen(state);
  const needsDetail = screen !== 'overview' && state.loopId !== null;

  useEffect(() => {
    let active = true;
    source.overview().then(
      (o) => active && (setOverview(o), setLoadError(null)),
      (e: unknown) => active && setLoadError(`cannot read the store: ${errorText(e)}`),
    );
    return () => { active = false; };
  }, [source, external, own]);

  useEffect(() => {
    if (!needsDetail) return;
    let active = true;
    source.loop(state.loopId!).then(
      (d) => active && setDetail(d),
      (e: unknown) => active && setLoadError(`cannot read ${state.loopId}: ${errorText(e)}`),
    );
    return () => { active = false; };
  }, [source, needsDetail, state.loopId, external, own]);

  const cmp = screen === 'compare' ? state.compare : null;
  useEffect(() => {
    if (cmp === null || state.loopId === null) return;
    let active = true;
    source.compare(state.loopId, cmp.a, cmp.b).then(
      (c) => active && setCompare(c),
      (e: unknown) => active && setLoadError(`cannot compare: ${errorText(e)}`),
    );
    return () => { active = false; };
  }, [source, cmp?.a, cmp?.b, state.loopId, external, own]);

  const live = useLiveResult(source, screen === 'edit' ? state.edit : null, detail?.unit ?? overview?.unit ?? 'hz');
  const frame = buildFrame(state, { overview, detail, compare, methods, live, loadError }, size, colour, now());
  const ctxRef = useRef<ActContext>(frame.ctx);
  ctxRef.current = frame.ctx;
  const scopeRef = useRef(frame.scope);
  scopeRef.current = frame.scope;

  const runEffect = useCallback(async (eff: Effect) => {
    try {
      switch (eff.kind) {
        case 'quit': exit(); return;
        case 'startEdit': {
          const d = await source.loop(eff.loopId);
          update((s) => editLoaded(s, d));
          return;
        }
        case 'save': {
          const r = await source.save(eff.loopId, eff.draft, eff.baseRevision, eff.note);
          update((s) => saveDone(s, eff.loopId, r));
          bumpOwn();
          return;
        }
        case 'apply': {
          const r = await source.applyProposal(eff.loopId, eff.proposal, eff.proposal.baseRevision, eff.note);
          update((s) => saveDone(s, eff.loopId, r));
          bumpOwn();
          return;
        }
        case 'propose': {
          const p = await source.propose(eff.loopId, eff.method);
          update((s) => proposed(s, eff.method, p));
          return;
        }
      }
    } catch (e) {
      update((s) => ({ ...s, message: { text: errorText(e), kind: 'error' } }));
    }
  }, [source, exit, update]);

  useInput(
    (input, key) => {
      for (const name of keyNames(input, key)) {
        const s = stateRef.current;
        const action = actionFor(name, { ...scopeRef.current, typing: s.typing, help: s.help });
        if (action !== null) {
          const step = act(s, action, ctxRef.current);
          update(() => step.state);
          if (step.effect) void runEffect(step.effect);
        } else if (s.typing !== null) {
          update((x) => (name === 'backspace' ? backspace(x) : name === 'ctrl-u' ? clearTyped(x) : typeText(x, [name])));
        }
      }
    },
    { isActive: isRawModeSupported === true },
  );

  return (
    <Box flexDirection="column" width={size.width} height={size.height}>
      <Lines lines={[frame.title]} colour={colour} />
      <Box flexDirection="column" height={size.body}>
        <Lines lines={frame.body} colour={colour} />
      </Box>
      <Text wrap="truncate-end" {...(colour ? { dimColor: true } : {})}>{frame.footer}</Text>
    </Box>
  );
}
