/** Keyboard shortcuts of the workspace: one list, used by the key handler and the help panel. */
export interface Shortcut {
  key: string;
  /** How the help panel writes the key. */
  label: string;
  action: ShortcutAction;
  description: string;
}

export type ShortcutAction = 'undo' | 'redo' | 'tool-move' | 'tool-exclude' | 'tool-erase' | 'tool-add-ring' | 'close-region' | 'open-image' | 'open-demo' | 'fit-view' | 'cycle-contrast' | 'toggle-centre' | 'toggle-rings' | 'toggle-predicted' | 'toggle-mask' | 'toggle-profile-log' | 'toggle-theme' | 'show-help' | 'escape';

/** Shortcuts with Ctrl (Cmd on a Mac): undo and redo. */
export const EDIT_SHORTCUTS: readonly Shortcut[] = [
  { key: 'z', label: 'Ctrl+Z', action: 'undo', description: 'Undo the last edit (centre, regions, rings, camera)' },
  { key: 'Z', label: 'Ctrl+Shift+Z', action: 'redo', description: 'Redo (also Ctrl+Y)' },
];

export const SHORTCUTS: readonly Shortcut[] = [
  { key: 'v', label: 'V', action: 'tool-move', description: 'Move tool: pan, drag the centre cross' },
  { key: 'e', label: 'E', action: 'tool-exclude', description: 'Exclude tool: click the corners of a region to mask' },
  { key: 'x', label: 'X', action: 'tool-erase', description: 'Erase tool: click a drawn region to unmask it' },
  { key: 'a', label: 'A', action: 'tool-add-ring', description: 'Add-ring tool: click a ring or a profile peak to fit it' },
  { key: 'Enter', label: 'Enter', action: 'close-region', description: 'Close the region being outlined' },
  { key: 'o', label: 'O', action: 'open-image', description: 'Open an image file' },
  { key: 'd', label: 'D', action: 'open-demo', description: 'Open the demo sample (gold standard)' },
  { key: 'f', label: 'F', action: 'fit-view', description: 'Fit the image to the view' },
  { key: 'k', label: 'K', action: 'cycle-contrast', description: 'Next contrast curve (log, gamma, linear)' },
  { key: 'c', label: 'C', action: 'toggle-centre', description: 'Show or hide the centre' },
  { key: 'r', label: 'R', action: 'toggle-rings', description: 'Show or hide the fitted rings' },
  { key: 'p', label: 'P', action: 'toggle-predicted', description: 'Show or hide the predicted rings' },
  { key: 'm', label: 'M', action: 'toggle-mask', description: 'Show or hide the mask' },
  { key: 'l', label: 'L', action: 'toggle-profile-log', description: 'Profile: linear or log scale' },
  { key: 't', label: 'T', action: 'toggle-theme', description: 'Dark or light theme' },
  { key: '?', label: '?', action: 'show-help', description: 'This list' },
  { key: 'Escape', label: 'Esc', action: 'escape', description: 'Drop the outline being drawn, cancel the running analysis, close this list' },
];

/** The action for a key press, or null (typing in a field never triggers one). */
export function shortcutFor(event: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'altKey'> & { shiftKey?: boolean }, inField: boolean): ShortcutAction | null {
  if ((event.ctrlKey || event.metaKey) && !event.altKey) {
    if (inField) return null; // the field's own undo
    const k = event.key.toLowerCase();
    if (k === 'z') return event.shiftKey ? 'redo' : 'undo';
    if (k === 'y') return 'redo';
    return null;
  }
  if (event.ctrlKey || event.metaKey || event.altKey) return null;
  if (inField && event.key !== 'Escape') return null;
  const key = event.key.length === 1 ? event.key.toLowerCase() : event.key;
  return SHORTCUTS.find((s) => s.key === key)?.action ?? null;
}
