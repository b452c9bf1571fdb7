// The standing cautions of the bench: input power, RF exposure, and what a verdict is for.
// Shown where a technician starts work with a meter.

export function Cautions() {
  return (
    <aside className="cautions" aria-label="Cautions">
      <p className="cautions-title">
        <span aria-hidden="true">⚠</span> Before you work with a meter
      </p>
      <ul>
        <li>
          <strong>Maximum input power.</strong> Never feed a meter more than the input power stated on its
          record: the cavity and its coupling can be damaged, and its reading shifts as it warms.
        </li>
        <li>
          <strong>RF exposure.</strong> Keep clear of open waveguide ends, horns and loose flanges while a
          high-power source is on.
        </li>
        <li>
          <strong>Verdicts support, they do not decide.</strong> They do not replace your lab’s quality
          system, local regulations, or accredited and licensed practice.
        </li>
      </ul>
    </aside>
  );
}
