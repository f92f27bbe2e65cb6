/**
 * The laser-safety caution the product shows wherever it guides a realignment or recalibration
 * (PRODUCT.md, "Cautions the product shows").
 */
export function SafetyCaution() {
  return (
    <aside
      aria-label="Safety caution"
      className="flex gap-3 rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-900"
    >
      <span aria-hidden className="mt-0.5 font-semibold">
        ⚠
      </span>
      <p>
        <strong className="font-semibold">Safety first.</strong> Realignment and acquisition involve Class 4 lasers,
        high voltage (MCP detectors) and vacuum systems. Your facility&apos;s laser-safety rules, interlocks and local
        regulations apply. The numbers Orderly gives are no substitute for the procedures of your responsible
        laser-safety officer.
      </p>
    </aside>
  );
}
