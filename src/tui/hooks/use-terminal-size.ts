import { useStdout } from 'ink';
import { useEffect, useState } from 'react';

/**
 * The terminal's columns and rows, updated on resize. Fixed sizes (tests, benchmarks) win.
 * @example
 * const { columns, rows } = useTerminalSize(); // => { columns: 80, rows: 24 }
 */
export function useTerminalSize(fixed?: { columns?: number; rows?: number }): { columns: number; rows: number } {
  const { stdout } = useStdout();
  const read = () => ({
    columns: fixed?.columns ?? (stdout.columns || 80),
    rows: fixed?.rows ?? (stdout.rows || 24),
  });
  const [size, setSize] = useState(read);
  useEffect(() => {
    if (fixed?.columns && fixed?.rows) return;
    const onResize = () => setSize(read());
    stdout.on('resize', onResize);
    return () => {
      stdout.off('resize', onResize);
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [stdout, fixed?.columns, fixed?.rows]);
  return size;
}
