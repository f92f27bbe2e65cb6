/**
 * Filters a lab puts in the beam, with the windows (eV) where each one's useful edge sits in the
 * 15-300 eV transmission tables: where the simulators look for the edge a scenario should show.
 */
export const FILTER_EDGE_WINDOWS_EV: Readonly<Record<string, readonly [number, number]>> = {
  Al: [60, 90],
  Mg: [40, 60],
  Si: [90, 110],
  Zr: [150, 260],
  Sn: [18, 30],
  In: [14, 22],
  Ti: [25, 40],
};
