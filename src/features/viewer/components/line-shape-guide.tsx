import type Konva from 'konva';
import { Circle, Group, Line } from 'react-konva';
import type { LineShape, SpatialBand } from '../../../../shared/engine/types.ts';
import { fromImageXY, toImageXY, type SpectralAxis } from '../lib/axis.ts';
import { bandCentrePx, lineShapeFromHandles, lineShiftPx } from '../lib/regions.ts';

export interface LineShapeGuideProps {
  axis: SpectralAxis;
  signal: SpatialBand;
  lineShape: LineShape;
  /** Spectral position of the guide at the band centre. */
  anchorSpectralPx: number;
  scale: number;
  editable: boolean;
  onAnchorChange(spectralPx: number): void;
  onLineShapeChange(lineShape: LineShape): void;
}

const HANDLE_SCREEN_PX = 6;
const COLOUR = '#f8fafc';

/**
 * The line tilt/curvature guide: the curve a spectral line follows across the signal band.
 * Drag the middle handle to put the guide on a line; drag the end handles onto the line's ends
 * to set tilt and curvature (lineShapeFromHandles).
 */
export function LineShapeGuide({ axis, signal, lineShape, anchorSpectralPx, scale, editable, onAnchorChange, onLineShapeChange }: LineShapeGuideProps) {
  const centre = bandCentrePx(signal);
  const half = (signal.end - signal.start - 1) / 2;
  const points: number[] = [];
  const steps = 24;
  for (let i = 0; i <= steps; i++) {
    const s = -half + (2 * half * i) / steps;
    const p = toImageXY(axis, anchorSpectralPx + lineShiftPx(lineShape, s), centre + s);
    points.push(p.x, p.y);
  }
  const top = toImageXY(axis, anchorSpectralPx + lineShiftPx(lineShape, -half), centre - half);
  const bottom = toImageXY(axis, anchorSpectralPx + lineShiftPx(lineShape, half), centre + half);
  const middle = toImageXY(axis, anchorSpectralPx, centre);

  // Handles move only along the spectral axis; their spatial position is fixed by the band.
  const along = (spatialPx: number) =>
    function (this: Konva.Node, pos: Konva.Vector2d) {
      const stage = this.getStage();
      if (!stage) return pos;
      const fixed = stage.getAbsoluteTransform().point(toImageXY(axis, 0, spatialPx));
      return axis === 'x' ? { x: pos.x, y: fixed.y } : { x: fixed.x, y: pos.y };
    };
  const spectralOf = (node: Konva.Node) => fromImageXY(axis, node.x(), node.y()).spectralPx;

  const endDrag = (which: 'top' | 'bottom') => (event: Konva.KonvaEventObject<DragEvent>) => {
    const shift = spectralOf(event.target) - anchorSpectralPx;
    const other = which === 'top' ? lineShiftPx(lineShape, half) : lineShiftPx(lineShape, -half);
    onLineShapeChange(which === 'top' ? lineShapeFromHandles(shift, other, half) : lineShapeFromHandles(other, shift, half));
  };

  const r = HANDLE_SCREEN_PX / scale;
  return (
    <Group>
      <Line points={points} stroke={COLOUR} strokeWidth={1.5} dash={[6, 4]} strokeScaleEnabled={false} listening={false} />
      {editable ? (
        <>
          <Circle {...middle} radius={r} fill={COLOUR} stroke="#0f172a" strokeWidth={1} strokeScaleEnabled={false} draggable dragBoundFunc={along(centre)} onDragMove={(e) => onAnchorChange(spectralOf(e.target))} name="line-guide-middle" />
          {half > 0 ? (
            <>
              <Circle {...top} radius={r} fill="#2dd4bf" stroke="#0f172a" strokeWidth={1} strokeScaleEnabled={false} draggable dragBoundFunc={along(centre - half)} onDragMove={endDrag('top')} name="line-guide-top" />
              <Circle {...bottom} radius={r} fill="#2dd4bf" stroke="#0f172a" strokeWidth={1} strokeScaleEnabled={false} draggable dragBoundFunc={along(centre + half)} onDragMove={endDrag('bottom')} name="line-guide-bottom" />
            </>
          ) : null}
        </>
      ) : null}
    </Group>
  );
}
