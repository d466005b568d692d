import { render } from 'ink';
import { App } from './App.js';
import type { DashSource } from './source.js';

/** Starts the interactive dashboard on the terminal and resolves when the user quits. */
export async function runApp(source: DashSource, opts: { colour: boolean; pollMs: number }): Promise<void> {
  const app = render(<App source={source} colour={opts.colour} pollMs={opts.pollMs} />, { exitOnCtrlC: true, patchConsole: false });
  await app.waitUntilExit();
}
