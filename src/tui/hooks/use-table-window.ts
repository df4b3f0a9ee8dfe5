import { useState } from 'react';
import { windowStart } from '../model.js';

/**
 * The first table row on screen. It is kept from the last render, so the window moves only when the
 * cursor leaves it (and stays put while another screen shows, for the table to come back as it was).
 * @example
 * useTableWindow(40, 12, 10); // => 3 on the first render (windowStart(40, 12, 10, 0))
 */
export function useTableWindow(total: number, cursor: number, height: number): number {
  const [shownFrom, setShownFrom] = useState(0);
  const start = windowStart(total, cursor, height, shownFrom);
  if (start !== shownFrom) setShownFrom(start); // React's pattern for state kept from the previous render
  return start;
}
