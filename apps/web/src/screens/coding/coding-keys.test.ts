// Key bindings of the coding view (the project's own spec in coding-keys.ts; Ctrl+Z/Ctrl+Shift+Z/Ctrl+Y for
// undo/redo are common practice across desktop programs).
import { describe, expect, it } from 'vitest';
import { commandFor, KEY_HELP } from './coding-keys.js';

const k = (key: string, mods: Partial<{ ctrlKey: boolean; metaKey: boolean; altKey: boolean; shiftKey: boolean }> = {}) =>
  commandFor({ key, ctrlKey: false, metaKey: false, altKey: false, shiftKey: false, ...mods });

describe('commandFor', () => {
  it('maps digits to recent codes and letters to commands', () => {
    expect(k('3')).toEqual({ do: 'recent', n: 3 });
    expect(k('0')).toBeNull();
    expect(k('c')).toEqual({ do: 'find-code' });
    expect(k('i')).toEqual({ do: 'in-vivo' });
    expect(k('x')).toBeNull();
  });
  it('maps undo and redo with Ctrl or Cmd, and leaves other Ctrl keys to the browser', () => {
    expect(k('z', { ctrlKey: true })).toEqual({ do: 'undo' });
    expect(k('Z', { ctrlKey: true, shiftKey: true })).toEqual({ do: 'redo' });
    expect(k('y', { metaKey: true })).toEqual({ do: 'redo' });
    expect(k('c', { ctrlKey: true })).toBeNull();
  });
  it('resizes with Alt+arrows: end by default, start with Shift', () => {
    expect(k('ArrowRight', { altKey: true })).toEqual({ do: 'resize', edge: 'end', dir: 1 });
    expect(k('ArrowLeft', { altKey: true, shiftKey: true })).toEqual({ do: 'resize', edge: 'start', dir: -1 });
  });
  it('lists every key it acts on, each with the control that does the same', () => {
    for (const key of ['t', 's', 'c', '/', '1', 'i', 'j', '[', ']', 'r', 'n', 'Delete', 'Escape', '?']) {
      expect(commandFor({ key, ctrlKey: false, metaKey: false, altKey: false, shiftKey: false }), key).not.toBeNull();
      expect(KEY_HELP.some((h) => h.keys.split(/ or | \/ |, /).some((k) => k === key || (key === '1' && k === '1–9'))), key).toBe(true);
    }
    for (const h of KEY_HELP) expect(h.control.length, h.keys).toBeGreaterThan(0);
  });
});
