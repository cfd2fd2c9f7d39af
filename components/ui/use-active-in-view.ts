import { useCallback, useEffect, useRef } from 'react';
import type { LayoutChangeEvent, ScrollView } from 'react-native';

/**
 * Keeps the active item of a sideways-scrolling tab row in sight: on a phone the row is wider than the
 * screen, and a tab opened from a link (or the last one, chosen after scrolling) would otherwise sit
 * off the edge with nothing saying which section is open.
 */
export function useActiveInView(activeKey: string | undefined) {
  const scroll = useRef<ScrollView>(null);
  const offsets = useRef(new Map<string, { x: number; width: number }>());
  const viewport = useRef(0);
  const scrollX = useRef(0);

  const reveal = useCallback((key: string | undefined) => {
    const item = key ? offsets.current.get(key) : undefined;
    if (!item || !scroll.current || viewport.current === 0) return;
    const margin = 24;
    const left = scrollX.current;
    const right = left + viewport.current;
    if (item.x - margin >= left && item.x + item.width + margin <= right) return;
    // Centre the item: the neighbours on both sides stay visible as a cue that the row scrolls.
    const x = Math.max(0, item.x - (viewport.current - item.width) / 2);
    scroll.current.scrollTo({ x, animated: false });
    scrollX.current = x;
  }, []);

  useEffect(() => reveal(activeKey), [activeKey, reveal]);

  /** onLayout for each item, by key. */
  const itemLayout = useCallback(
    (key: string) => (e: LayoutChangeEvent) => {
      const { x, width } = e.nativeEvent.layout;
      offsets.current.set(key, { x, width });
      if (key === activeKey) reveal(key);
    },
    [activeKey, reveal],
  );
  const viewportLayout = useCallback(
    (e: LayoutChangeEvent) => {
      viewport.current = e.nativeEvent.layout.width;
      reveal(activeKey);
    },
    [activeKey, reveal],
  );
  const onScrollX = useCallback((x: number) => {
    scrollX.current = x;
  }, []);

  return { scroll, itemLayout, viewportLayout, onScrollX };
}
