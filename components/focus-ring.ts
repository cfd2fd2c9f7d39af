import { useEffect } from 'react';
import { color } from './theme';

/**
 * A focus ring that keyboard users can always see (web): every focusable element shows it when
 * reached by keyboard, not on a mouse or touch press.
 */
export function useFocusRing(): void {
  useEffect(() => {
    if (typeof document === 'undefined' || document.getElementById('isobar-focus-ring')) return;
    const style = document.createElement('style');
    style.id = 'isobar-focus-ring';
    // A box that holds an input and its unit draws the ring around the whole box, not the inner input.
    style.textContent = [
      `:focus-visible { outline: 3px solid ${color.focus} !important; outline-offset: 2px; border-radius: 4px; }`,
      `[data-focus-ring="within"] :focus-visible { outline: none !important; }`,
      `[data-focus-ring="within"]:has(:focus-visible) { outline: 3px solid ${color.focus}; outline-offset: 2px; }`,
    ].join('\n');
    document.head.appendChild(style);
  }, []);
}
