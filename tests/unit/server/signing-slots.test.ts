import { describe, expect, it } from 'vitest';
import { slots } from '../../../server/reports/signing-slots';

const tick = () => new Promise((r) => setTimeout(r, 0));

describe('signing slots', () => {
  it('runs at most the given number at once, the rest in the order they came', async () => {
    const s = slots(2);
    let running = 0;
    let most = 0;
    const started: number[] = [];
    const gates: Array<() => void> = [];
    const jobs = [0, 1, 2, 3, 4].map((i) =>
      s.run(async () => {
        started.push(i);
        running++;
        most = Math.max(most, running);
        await new Promise<void>((r) => gates.push(r));
        running--;
        return i;
      }),
    );
    await tick();
    expect(started).toEqual([0, 1]);
    expect(s.waiting).toBe(3);
    gates[1]();
    await tick();
    expect(started).toEqual([0, 1, 2]);
    for (let k = 0; k < 10 && gates.length < 5; k++) {
      gates.forEach((g) => g());
      await tick();
    }
    gates.forEach((g) => g());
    expect(await Promise.all(jobs)).toEqual([0, 1, 2, 3, 4]);
    expect(most).toBe(2);
    expect(s.waiting).toBe(0);
  });

  it('frees the slot when the work fails', async () => {
    const s = slots(1);
    await expect(s.run(async () => Promise.reject(new Error('refused')))).rejects.toThrow('refused');
    expect(await s.run(async () => 'next')).toBe('next');
  });
});
