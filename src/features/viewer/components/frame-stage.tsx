import { useState } from 'react';
import type Konva from 'konva';
import { Image as KonvaImage, Layer, Rect, Stage } from 'react-konva';
import { bandRect, fromImageXY, type SpectralAxis } from '../lib/axis.ts';
import { editorActions, useEditor, type EditorStore } from '../lib/editor-store.ts';
import { axisLengths, bandFromDrag } from '../lib/regions.ts';
import { wheelZoomFactor, zoomAbout, type ViewTransform } from '../lib/view-transform.ts';
import { BandShape } from './band-shape.tsx';
import { LineShapeGuide } from './line-shape-guide.tsx';

export interface FrameStageProps {
  image: HTMLCanvasElement | null;
  widthPx: number;
  heightPx: number;
  axis: SpectralAxis;
  store: EditorStore;
  view: ViewTransform;
  onViewChange(view: ViewTransform): void;
  viewportWidthPx: number;
  viewportHeightPx: number;
  editable: boolean;
  /** Image pixel under the pointer (column, row), or null when it leaves the image. */
  onHover(pixel: { col: number; row: number } | null): void;
}

export const SIGNAL_COLOUR = '#2dd4bf';
export const BACKGROUND_COLOUR = '#fbbf24';

/**
 * The frame on a Konva stage: a static image layer (not listening) and an interactive overlay
 * with the signal band, the background bands and the line-shape guide. Wheel zooms about the
 * pointer, dragging the empty image pans, and with a draw tool a drag draws a band.
 */
export function FrameStage({ image, widthPx, heightPx, axis, store, view, onViewChange, viewportWidthPx, viewportHeightPx, editable, onHover }: FrameStageProps) {
  const regions = useEditor(store, (s) => s.regions);
  const tool = useEditor(store, (s) => s.tool);
  const drawing = useEditor(store, (s) => s.drawing);
  const { spectralLength, spatialLength } = axisLengths(widthPx, heightPx, axis);
  const [anchorSpectralPx, setAnchor] = useState(() => Math.round(spectralLength / 2));

  const pointerImage = (stage: Konva.Stage) => {
    const p = stage.getRelativePointerPosition();
    return p ? fromImageXY(axis, p.x, p.y) : null;
  };

  const onWheel = (event: Konva.KonvaEventObject<WheelEvent>) => {
    event.evt.preventDefault();
    const stage = event.target.getStage();
    const pointer = stage?.getPointerPosition();
    if (!pointer) return;
    onViewChange(zoomAbout(view, wheelZoomFactor(event.evt.deltaY), pointer.x, pointer.y));
  };

  const onMouseDown = (event: Konva.KonvaEventObject<MouseEvent>) => {
    if (tool === 'pan' || !editable) return;
    const stage = event.target.getStage();
    const at = stage && pointerImage(stage);
    if (at) store.setState(editorActions.startDraw(at.spatialPx));
  };

  const onMouseMove = (event: Konva.KonvaEventObject<MouseEvent>) => {
    const stage = event.target.getStage();
    const p = stage?.getRelativePointerPosition();
    if (!p) return;
    const col = Math.round(p.x);
    const row = Math.round(p.y);
    onHover(col >= 0 && col < widthPx && row >= 0 && row < heightPx ? { col, row } : null);
    if (drawing && stage) {
      const at = pointerImage(stage);
      if (at) store.setState(editorActions.updateDraw(at.spatialPx));
    }
  };

  const onMouseUp = () => {
    if (drawing) store.setState(editorActions.endDraw(spatialLength));
  };

  const preview = drawing ? bandFromDrag(drawing.fromPx, drawing.toPx, spatialLength) : null;

  return (
    <Stage
      width={viewportWidthPx}
      height={viewportHeightPx}
      scaleX={view.scale}
      scaleY={view.scale}
      x={view.offsetX}
      y={view.offsetY}
      draggable={tool === 'pan'}
      onDragEnd={(event) => {
        if (event.target === event.target.getStage()) onViewChange({ ...view, offsetX: event.target.x(), offsetY: event.target.y() });
      }}
      onWheel={onWheel}
      onMouseDown={onMouseDown}
      onMouseMove={onMouseMove}
      onMouseUp={onMouseUp}
      onMouseLeave={() => onHover(null)}
      style={{ cursor: tool === 'pan' ? 'grab' : 'crosshair' }}
      className="bg-slate-950"
    >
      <Layer listening={false} imageSmoothingEnabled={false}>
        {image ? <KonvaImage image={image} x={-0.5} y={-0.5} width={widthPx} height={heightPx} /> : null}
      </Layer>
      <Layer>
        {regions.background.map((band, index) => (
          <BandShape
            key={`bg-${index}`}
            band={band}
            label={`background ${index + 1}`}
            colour={BACKGROUND_COLOUR}
            axis={axis}
            spectralLength={spectralLength}
            spatialLength={spatialLength}
            scale={view.scale}
            editable={editable && tool === 'pan'}
            onChange={(next) => store.setState(editorActions.setBackground(index, next))}
          />
        ))}
        <BandShape
          band={regions.signal}
          label="signal"
          colour={SIGNAL_COLOUR}
          axis={axis}
          spectralLength={spectralLength}
          spatialLength={spatialLength}
          scale={view.scale}
          editable={editable && tool === 'pan'}
          onChange={(next) => store.setState(editorActions.setSignal(next))}
        />
        <LineShapeGuide
          axis={axis}
          signal={regions.signal}
          lineShape={regions.lineShape}
          anchorSpectralPx={anchorSpectralPx}
          scale={view.scale}
          editable={editable && tool === 'pan'}
          onAnchorChange={setAnchor}
          onLineShapeChange={(shape) => store.setState(editorActions.setLineShape(shape))}
        />
        {preview ? (
          <Rect
            {...bandRect(axis, preview.start, preview.end, spectralLength)}
            stroke={tool === 'draw-signal' ? SIGNAL_COLOUR : BACKGROUND_COLOUR}
            dash={[4, 4]}
            strokeWidth={1.5}
            strokeScaleEnabled={false}
            listening={false}
          />
        ) : null}
      </Layer>
    </Stage>
  );
}
