import { Button } from '@/components/button';
import { NumberField } from '@/components/number-field';
import { editorActions, useEditor, type EditorStore, type EditorTool } from '../lib/editor-store.ts';
import { overlappingBackground } from '../lib/regions.ts';

export interface RegionPanelProps {
  store: EditorStore;
  editable: boolean;
  /** Shown only when the user may save the frame's regions / the instrument's default. */
  onSaveFrame?: () => void;
  onSaveInstrument?: () => void;
  savingFrame?: boolean;
  savingInstrument?: boolean;
  onReset(): void;
}

const TOOLS: { tool: EditorTool; label: string }[] = [
  { tool: 'pan', label: 'Move / pan' },
  { tool: 'draw-signal', label: 'Draw signal band' },
  { tool: 'draw-background', label: 'Add background band' },
];

/** Region tools, the bands and line shape as numbers, and the save buttons. */
export function RegionPanel({ store, editable, onSaveFrame, onSaveInstrument, savingFrame, savingInstrument, onReset }: RegionPanelProps) {
  const regions = useEditor(store, (s) => s.regions);
  const tool = useEditor(store, (s) => s.tool);
  const dirty = useEditor(store, (s) => s.dirty);
  const overlaps = overlappingBackground(regions);

  return (
    <div className="flex flex-col gap-4">
      {editable ? (
        <div className="flex flex-wrap gap-2" role="toolbar" aria-label="Region tools">
          {TOOLS.map((t) => (
            <Button key={t.tool} variant={tool === t.tool ? 'primary' : 'secondary'} aria-pressed={tool === t.tool} onClick={() => store.setState(editorActions.setTool(t.tool))}>
              {t.label}
            </Button>
          ))}
        </div>
      ) : null}
      <table className="w-full text-sm tabular-nums">
        <thead>
          <tr className="text-left text-slate-500">
            <th className="py-1 font-medium">band</th>
            <th className="py-1 font-medium">rows (start–end, end exclusive)</th>
            <th />
          </tr>
        </thead>
        <tbody>
          <tr data-testid="signal-band">
            <td className="py-1 font-medium text-teal-700">signal</td>
            <td className="py-1">
              {regions.signal.start}–{regions.signal.end}
            </td>
            <td />
          </tr>
          {regions.background.map((band, index) => (
            <tr key={index} data-testid="background-band">
              <td className="py-1 font-medium whitespace-nowrap text-amber-700">background {index + 1}</td>
              <td className="py-1">
                {band.start}–{band.end}
              </td>
              <td className="py-1 text-right">
                {editable ? (
                  <Button variant="ghost" onClick={() => store.setState(editorActions.removeBackground(index))}>
                    Remove
                  </Button>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {overlaps.length > 0 ? (
        <p role="alert" className="text-sm text-red-700">
          A background band overlaps the signal band ({overlaps.map((b) => `${b.start}–${b.end}`).join(', ')}); the engine will refuse it. Move or remove it.
        </p>
      ) : null}
      <div className="grid grid-cols-2 gap-3">
        <NumberField
          label="Tilt (px per px)"
          step="0.001"
          disabled={!editable}
          value={regions.lineShape.tiltPxPerPx}
          format={(v) => String(Number(v.toFixed(5)))}
          onCommit={(v) => store.setState(editorActions.setLineShape({ ...store.getState().regions.lineShape, tiltPxPerPx: v }))}
        />
        <NumberField
          label="Curvature (px per px²)"
          step="0.00001"
          disabled={!editable}
          value={regions.lineShape.curvaturePxPerPx2}
          format={(v) => String(Number(v.toExponential(3)))}
          onCommit={(v) => store.setState(editorActions.setLineShape({ ...store.getState().regions.lineShape, curvaturePxPerPx2: v }))}
        />
      </div>
      <p className="text-xs text-slate-500">
        Drag the dashed guide&apos;s middle dot onto a line, then its end dots onto the line&apos;s ends to set tilt and curvature.
      </p>
      {editable ? (
        <div className="flex flex-wrap items-center gap-2">
          {onSaveFrame ? (
            <Button pending={savingFrame} disabled={overlaps.length > 0} onClick={onSaveFrame}>
              Save regions with this frame
            </Button>
          ) : null}
          {onSaveInstrument ? (
            <Button variant="secondary" pending={savingInstrument} disabled={overlaps.length > 0} onClick={onSaveInstrument}>
              Save as instrument default
            </Button>
          ) : null}
          <Button variant="ghost" onClick={onReset}>
            Reset
          </Button>
          {dirty ? <span className="text-xs text-slate-500">unsaved changes</span> : null}
        </div>
      ) : null}
    </div>
  );
}
