import { useEffect, useMemo, useRef, useState } from 'react';
import type { Calibration } from '../../../../shared/engine/types.ts';
import type { DecodedFrame } from '@/lib/frame-worker/protocol';
import { histogramOfSorted, percentileOfSorted } from '@/lib/frame-worker/scaling';
import { useLineout } from '@/lib/frame-worker/use-lineout';
import { useRenderedImage } from '@/lib/frame-worker/use-rendered-image';
import { Button } from '@/components/button';
import { createEditorStore, editorActions, useEditor } from '../lib/editor-store.ts';
import { axisLengths, defaultRegions, overlappingBackground, type Regions } from '../lib/regions.ts';
import { fitView, type ViewTransform } from '../lib/view-transform.ts';
import type { SpectralAxis } from '../lib/axis.ts';
import { ColourBar } from './colour-bar.tsx';
import { CONTRAST_PRESETS, DisplayControls, type DisplaySettings } from './display-controls.tsx';
import { FrameStage } from './frame-stage.tsx';
import { HoverReadout } from './hover-readout.tsx';
import { LineoutPlot } from './lineout-plot.tsx';
import { RegionPanel } from './region-panel.tsx';

export interface FrameViewerProps {
  frame: DecodedFrame;
  axis: SpectralAxis;
  /** Regions saved with the frame, else the instrument default, else null (a default is made). */
  initialRegions: Regions | null;
  calibration: Calibration | null;
  calibrationLabel?: string;
  editable: boolean;
  onSaveFrame?: (regions: Regions) => Promise<unknown>;
  onSaveInstrument?: (regions: Regions) => Promise<unknown>;
}

const VIEWPORT_HEIGHT_PX = 460;

function limitsFor(frame: DecodedFrame, preset: string): [number, number] {
  const [lo, hi] = CONTRAST_PRESETS[preset] ?? CONTRAST_PRESETS['1–99.5 %'];
  const loCounts = percentileOfSorted(frame.sortedSample, lo);
  let hiCounts = percentileOfSorted(frame.sortedSample, hi);
  if (!(hiCounts > loCounts)) hiCounts = loCounts + 1;
  return [loCounts, hiCounts];
}

/**
 * The frame viewer: the image (zoom, pan, stretch, colour map, colour bar), the region editor
 * over it, the live lineout under it, and the hover readout.
 */
export function FrameViewer({ frame, axis, initialRegions, calibration, calibrationLabel, editable, onSaveFrame, onSaveInstrument }: FrameViewerProps) {
  const { spatialLength } = axisLengths(frame.width, frame.height, axis);
  const startRegions = initialRegions ?? defaultRegions(spatialLength);
  const [store] = useState(() => createEditorStore(startRegions));
  const regions = useEditor(store, (s) => s.regions);

  const [settings, setSettings] = useState<DisplaySettings>(() => {
    const [loCounts, hiCounts] = limitsFor(frame, '1–99.5 %');
    return { scaling: 'asinh', colourMap: 'viridis', preset: '1–99.5 %', loCounts, hiCounts };
  });
  const renderOptions = useMemo(
    () => ({ loCounts: settings.loCounts, hiCounts: settings.hiCounts, scaling: settings.scaling, colourMap: settings.colourMap }),
    [settings],
  );
  const image = useRenderedImage(frame.key, renderOptions);

  const holder = useRef<HTMLDivElement>(null);
  const [viewportWidthPx, setViewportWidth] = useState(800);
  const [view, setView] = useState<ViewTransform>(() => fitView(frame.width, frame.height, 800, VIEWPORT_HEIGHT_PX));
  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const width = el.clientWidth;
    setViewportWidth(width);
    setView(fitView(frame.width, frame.height, width, VIEWPORT_HEIGHT_PX));
    const observer = new ResizeObserver(() => setViewportWidth(el.clientWidth));
    observer.observe(el);
    return () => observer.disconnect();
  }, [frame.width, frame.height]);

  const [hover, setHover] = useState<{ col: number; row: number } | null>(null);
  const overlaps = overlappingBackground(regions).length > 0;
  const lineoutOptions = useMemo(
    () => (overlaps ? null : { spectralAxis: axis, signal: regions.signal, background: regions.background, lineShape: regions.lineShape }),
    [axis, regions, overlaps],
  );
  const { lineout, error: lineoutError } = useLineout(frame.key, lineoutOptions);

  const histogram = useMemo(() => {
    const { edgesCounts, counts } = histogramOfSorted(frame.sortedSample, settings.loCounts, settings.hiCounts, 120);
    const centresCounts = new Float64Array(counts.length);
    for (let i = 0; i < counts.length; i++) centresCounts[i] = (edgesCounts[i] + edgesCounts[i + 1]) / 2;
    return { centresCounts, counts };
  }, [frame.sortedSample, settings.loCounts, settings.hiCounts]);

  const [saving, setSaving] = useState<'frame' | 'instrument' | null>(null);
  const save = (which: 'frame' | 'instrument', fn?: (r: Regions) => Promise<unknown>) =>
    fn
      ? () => {
          setSaving(which);
          fn(store.getState().regions)
            .then(() => store.setState(editorActions.markSaved()))
            .catch(() => undefined)
            .finally(() => setSaving(null));
        }
      : undefined;

  return (
    <div className="flex flex-col gap-4">
      <DisplayControls
        settings={settings}
        onChange={setSettings}
        onPreset={(preset) => {
          if (preset === 'manual') return setSettings((s) => ({ ...s, preset }));
          const [loCounts, hiCounts] = limitsFor(frame, preset);
          setSettings((s) => ({ ...s, preset, loCounts, hiCounts }));
        }}
      />
      <div className="grid gap-4 lg:grid-cols-[1fr_20rem]">
        <div className="flex min-w-0 flex-col gap-2">
          <div ref={holder} className="relative overflow-hidden rounded-md border border-slate-300" data-testid="frame-stage"
            // The view transform, for browser tests that draw at given image pixels.
            data-scale={view.scale}
            data-offset-x={view.offsetX}
            data-offset-y={view.offsetY}
            style={{ height: VIEWPORT_HEIGHT_PX }}
          >
            <FrameStage
              image={image}
              widthPx={frame.width}
              heightPx={frame.height}
              axis={axis}
              store={store}
              view={view}
              onViewChange={setView}
              viewportWidthPx={viewportWidthPx}
              viewportHeightPx={VIEWPORT_HEIGHT_PX}
              editable={editable}
              onHover={setHover}
            />
            <div className="absolute top-2 right-2 flex gap-1">
              <Button variant="secondary" className="px-2 py-1 text-xs" onClick={() => setView(fitView(frame.width, frame.height, viewportWidthPx, VIEWPORT_HEIGHT_PX))}>
                Fit
              </Button>
            </div>
          </div>
          <ColourBar loCounts={settings.loCounts} hiCounts={settings.hiCounts} scaling={settings.scaling} colourMap={settings.colourMap} histogram={histogram} />
          <HoverReadout pixel={hover} data={frame.data} widthPx={frame.width} axis={axis} calibration={calibration} calibrationLabel={calibrationLabel} />
        </div>
        <RegionPanel
          store={store}
          editable={editable}
          onSaveFrame={save('frame', onSaveFrame)}
          onSaveInstrument={save('instrument', onSaveInstrument)}
          savingFrame={saving === 'frame'}
          savingInstrument={saving === 'instrument'}
          onReset={() => store.setState(editorActions.load(startRegions))}
        />
      </div>
      <div>
        <h3 className="mb-1 text-sm font-semibold text-slate-800">Lineout (signal band, background subtracted, tilt corrected)</h3>
        {lineoutError ? (
          <p role="alert" className="text-sm text-red-700">
            {lineoutError}
          </p>
        ) : null}
        <LineoutPlot countsPerPixel={lineout?.counts ?? null} />
      </div>
    </div>
  );
}
