import type Konva from 'konva';
import { Group, Rect, Text } from 'react-konva';
import type { SpatialBand } from '../../../../shared/engine/types.ts';
import { bandRect, fromImageXY, type SpectralAxis } from '../lib/axis.ts';
import { moveBand, resizeBand } from '../lib/regions.ts';

export interface BandShapeProps {
  band: SpatialBand;
  label: string;
  colour: string;
  axis: SpectralAxis;
  spectralLength: number;
  spatialLength: number;
  /** Screen pixels per image pixel, to keep handles a constant size on screen. */
  scale: number;
  editable: boolean;
  onChange(band: SpatialBand): void;
}

const HANDLE_SCREEN_PX = 8;

/**
 * One band across the spatial axis: drag the body to move it, drag an edge to resize it. Every
 * drag goes through the pure kernels (moveBand, resizeBand), which snap to whole rows.
 */
export function BandShape({ band, label, colour, axis, spectralLength, spatialLength, scale, editable, onChange }: BandShapeProps) {
  const rect = bandRect(axis, band.start, band.end, spectralLength);
  const handle = HANDLE_SCREEN_PX / scale;
  const spatialOf = (node: Konva.Node) => fromImageXY(axis, node.x(), node.y()).spatialPx;

  const onBodyDrag = (event: Konva.KonvaEventObject<DragEvent>) => {
    const node = event.target;
    const next = moveBand(band, spatialOf(node) - (band.start - 0.5), spatialLength);
    const snapped = bandRect(axis, next.start, next.end, spectralLength);
    node.position({ x: snapped.x, y: snapped.y });
    if (next.start !== band.start) onChange(next);
  };

  const onEdgeDrag = (edge: 'start' | 'end') => (event: Konva.KonvaEventObject<DragEvent>) => {
    const node = event.target;
    // The handle's centre marks the boundary; a boundary between rows k-1 and k sits at k - 0.5.
    const boundary = spatialOf(node) + handle / 2 + 0.5;
    const next = resizeBand(band, edge, boundary, spatialLength);
    const at = (edge === 'start' ? next.start : next.end) - 0.5 - handle / 2;
    node.position(axis === 'x' ? { x: -0.5, y: at } : { x: at, y: -0.5 });
    if (next.start !== band.start || next.end !== band.end) onChange(next);
  };

  const edgeRect = (at: number) =>
    axis === 'x' ? { x: -0.5, y: at - 0.5 - handle / 2, width: spectralLength, height: handle } : { x: at - 0.5 - handle / 2, y: -0.5, width: handle, height: spectralLength };

  const cursor = axis === 'x' ? 'ns-resize' : 'ew-resize';
  const setCursor = (value: string) => (event: Konva.KonvaEventObject<MouseEvent>) => {
    const container = event.target.getStage()?.container();
    if (container && editable) container.style.cursor = value;
  };

  return (
    <Group>
      <Rect
        {...rect}
        fill={colour}
        opacity={0.18}
        stroke={colour}
        strokeWidth={1.5}
        strokeScaleEnabled={false}
        draggable={editable}
        dragBoundFunc={function (this: Konva.Node, pos) {
          // Move only across the spatial axis.
          const abs = this.absolutePosition();
          return axis === 'x' ? { x: abs.x, y: pos.y } : { x: pos.x, y: abs.y };
        }}
        onDragMove={onBodyDrag}
        onMouseEnter={setCursor('move')}
        onMouseLeave={setCursor('')}
        name={`band-${label}`}
      />
      {editable
        ? (['start', 'end'] as const).map((edge) => (
            <Rect
              key={edge}
              {...edgeRect(edge === 'start' ? band.start : band.end)}
              fill={colour}
              opacity={0.55}
              draggable
              dragBoundFunc={function (this: Konva.Node, pos) {
                const abs = this.absolutePosition();
                return axis === 'x' ? { x: abs.x, y: pos.y } : { x: pos.x, y: abs.y };
              }}
              onDragMove={onEdgeDrag(edge)}
              onMouseEnter={setCursor(cursor)}
              onMouseLeave={setCursor('')}
            />
          ))
        : null}
      <Text
        x={rect.x + 4 / scale}
        y={rect.y + 3 / scale}
        text={`${label} ${band.start}–${band.end}`}
        fontSize={12 / scale}
        fontFamily="Fira Sans, sans-serif"
        fill="#ffffff"
        shadowColor="#0f172a"
        shadowBlur={2}
        listening={false}
      />
    </Group>
  );
}
