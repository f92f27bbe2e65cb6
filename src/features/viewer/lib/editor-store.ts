/**
 * The region editor's state, kept outside React (a tiny external store read with
 * useSyncExternalStore), so dragging a band re-renders only what reads it. The tool is a small
 * state machine: idle (pan) → drawing (drag) → idle; moving and resizing go through the bands' own
 * handles and the pure kernels in regions.ts.
 */
import { useSyncExternalStore } from 'react';
import type { LineShape, SpatialBand } from '../../../../shared/engine/types.ts';
import { bandFromDrag, type Regions } from './regions.ts';

export type EditorTool = 'pan' | 'draw-signal' | 'draw-background';

export interface EditorState {
  regions: Regions;
  tool: EditorTool;
  /** The band being drawn (spatial pixel coordinates of the drag), while the mouse is down. */
  drawing: { fromPx: number; toPx: number } | null;
  /** True once the user changed the regions since they were loaded or saved. */
  dirty: boolean;
}

export interface EditorStore {
  getState(): EditorState;
  setState(update: (state: EditorState) => EditorState): void;
  subscribe(listener: () => void): () => void;
}

/** A store holding one editor's state. */
export function createEditorStore(regions: Regions): EditorStore {
  let state: EditorState = { regions, tool: 'pan', drawing: null, dirty: false };
  const listeners = new Set<() => void>();
  return {
    getState: () => state,
    setState(update) {
      const next = update(state);
      if (next === state) return;
      state = next;
      for (const listener of listeners) listener();
    },
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
}

/** Reads a slice of the editor state; re-renders when that slice changes (by identity). */
export function useEditor<T>(store: EditorStore, select: (state: EditorState) => T): T {
  return useSyncExternalStore(store.subscribe, () => select(store.getState()));
}

/** Transitions, as pure functions of the state. */
export const editorActions = {
  setTool: (tool: EditorTool) => (s: EditorState): EditorState => ({ ...s, tool, drawing: null }),
  startDraw: (atPx: number) => (s: EditorState): EditorState => (s.tool === 'pan' ? s : { ...s, drawing: { fromPx: atPx, toPx: atPx } }),
  updateDraw: (atPx: number) => (s: EditorState): EditorState => (s.drawing ? { ...s, drawing: { ...s.drawing, toPx: atPx } } : s),
  /** Ends a drag: the drawn band becomes the signal or a new background band; the tool returns to pan. */
  endDraw: (spatialLength: number) => (s: EditorState): EditorState => {
    if (!s.drawing) return s;
    const band = bandFromDrag(s.drawing.fromPx, s.drawing.toPx, spatialLength);
    const regions =
      s.tool === 'draw-signal' ? { ...s.regions, signal: band } : { ...s.regions, background: [...s.regions.background, band] };
    return { ...s, regions, drawing: null, tool: 'pan', dirty: true };
  },
  setSignal: (band: SpatialBand) => (s: EditorState): EditorState => ({ ...s, regions: { ...s.regions, signal: band }, dirty: true }),
  setBackground: (index: number, band: SpatialBand) => (s: EditorState): EditorState => ({
    ...s,
    regions: { ...s.regions, background: s.regions.background.map((b, i) => (i === index ? band : b)) },
    dirty: true,
  }),
  removeBackground: (index: number) => (s: EditorState): EditorState => ({
    ...s,
    regions: { ...s.regions, background: s.regions.background.filter((_, i) => i !== index) },
    dirty: true,
  }),
  setLineShape: (lineShape: LineShape) => (s: EditorState): EditorState => ({ ...s, regions: { ...s.regions, lineShape }, dirty: true }),
  /** Replaces everything (a load or a reset) and clears the dirty flag. */
  load: (regions: Regions) => (s: EditorState): EditorState => ({ ...s, regions, drawing: null, dirty: false }),
  markSaved: () => (s: EditorState): EditorState => ({ ...s, dirty: false }),
};
