/** The field-work cautions (PRODUCT.md "Cautions the product shows"), shown on every survey page. */
export function FieldCautions() {
  return (
    <aside className="rounded-card border-2 border-warn/70 bg-warn/10 p-4" aria-labelledby="field-cautions" data-testid="field-cautions">
      <h2 id="field-cautions" className="font-bold">Before you go out</h2>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
        <li>Work in pairs.</li>
        <li>Tell someone your plan and when you will be back.</li>
        <li>Have permission for after-hours access to the land you walk.</li>
        <li>Carry a red light and warm layers.</li>
        <li>Never take readings on a roadway.</li>
      </ul>
    </aside>
  );
}
