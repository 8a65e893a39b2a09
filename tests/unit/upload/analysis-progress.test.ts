import { describe, expect, it } from 'vitest';
import { createProgressBoard } from '@/lib/server/uploads/analysis-progress';

describe('analysis progress board', () => {
  it('reports the fraction read and changes its tag whenever the shown progress changes', () => {
    const board = createProgressBoard();
    const tags = new Set([board.tag()]);
    expect(board.fraction('f1')).toBeNull();

    board.set('f1', { bytesDone: 0, bytesTotal: 0 });
    expect(board.fraction('f1')).toBe(0);
    expect(tags.has(board.tag())).toBe(false);
    tags.add(board.tag());

    board.set('f1', { bytesDone: 250, bytesTotal: 1000 });
    expect(board.fraction('f1')).toBe(0.25);
    expect(tags.has(board.tag())).toBe(false);
    tags.add(board.tag());

    // Less than a tenth of a percent more: the same tag, so cached answers stay.
    const before = board.tag();
    board.set('f1', { bytesDone: 250_000, bytesTotal: 1_000_000 });
    board.set('f1', { bytesDone: 250_900, bytesTotal: 1_000_000 });
    expect(board.tag()).toBe(before);
    board.set('f1', { bytesDone: 251_000, bytesTotal: 1_000_000 });
    expect(tags.has(board.tag())).toBe(false);
    tags.add(board.tag());

    // A second analysis starting, then each ending, are changes too.
    board.set('f2', { bytesDone: 0, bytesTotal: 0 });
    expect(tags.has(board.tag())).toBe(false);
    tags.add(board.tag());
    board.delete('f1');
    expect(board.fraction('f1')).toBeNull();
    expect(tags.has(board.tag())).toBe(false);
    tags.add(board.tag());
    const afterDelete = board.tag();
    board.delete('f1');
    expect(board.tag()).toBe(afterDelete);
    expect(board.fraction('f2')).toBe(0);
  });

  it('never reports more than all of the file', () => {
    const board = createProgressBoard();
    board.set('f', { bytesDone: 1200, bytesTotal: 1000 });
    expect(board.fraction('f')).toBe(1);
  });
});
