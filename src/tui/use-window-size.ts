import { useStdout } from 'ink';
import { useEffect, useState } from 'react';

/** The terminal's size in cells; re-read when the window is resized. */
export interface WindowSize {
  readonly columns: number | undefined;
  readonly rows: number | undefined;
}

/** Subscribes to the output stream's `resize` event; unsubscribes on unmount. */
export function useWindowSize(): WindowSize {
  const { stdout } = useStdout();
  const read = (): WindowSize => ({ columns: stdout.columns, rows: stdout.rows });
  const [size, setSize] = useState<WindowSize>(read);
  useEffect(() => {
    const onResize = () => setSize(read());
    stdout.on('resize', onResize);
    return () => {
      stdout.off('resize', onResize);
    };
  }, [stdout]);
  return size;
}
