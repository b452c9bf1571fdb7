// The names people see for the fields of the lab's records: a refusal names the field as the
// form does ("Reading 2, value"), never by its machine path ("readings[1].value"), which stays
// in the `field` of each issue for programs (JSON output, the wire). Pure: no project imports.

/** Form labels of the last key of a path, as the record, meter, standard and settings forms name them. */
const LABELS: Readonly<Record<string, string>> = {
  // check (record form)
  meterAssetId: 'Meter',
  date: 'Date',
  performer: 'Performed by',
  standards: 'Standards used',
  method: 'How the points were found',
  remarks: 'Remarks',
  adjusted: 'Adjusted',
  temperatureC: 'Temperature (°C)',
  pressureHpa: 'Pressure (hPa)',
  humidityPct: 'Relative humidity (%RH)',
  temperatureUncertaintyC: 'Temperature uncertainty (°C)',
  pressureUncertaintyHpa: 'Pressure uncertainty (hPa)',
  humidityUncertaintyPct: 'Relative humidity uncertainty (%RH)',
  reference: 'Reference frequency',
  referenceHz: 'Reference frequency',
  standard: 'Standard',
  value: 'value',
  direction: 'direction (up or down)',
  dipDepthDb: 'Dip depth (dB)',
  phase: 'Phase (as found or as left)',
  sweep: 'Sweep file',
  // meter
  assetId: 'Asset id',
  description: 'Description',
  construction: 'Construction',
  port: 'Connector or waveguide size',
  minHz: 'Band from',
  maxHz: 'Band to',
  dialKind: 'Dial',
  resolution: 'Dial resolution',
  accuracyRelPpm: 'Stated accuracy (ppm of reading)',
  accuracyAbsHz: 'Stated accuracy, absolute term',
  alphaPerK: 'Thermal coefficient (ppm/K)',
  alphaUncertaintyPerK: 'Uncertainty of the thermal coefficient (ppm/K)',
  loadedQ: 'Loaded Q',
  maxInputPowerW: 'Maximum input power (W)',
  minDipDb: 'Minimum dip (dB)',
  location: 'Location',
  intervalMonths: 'Interval (months)',
  state: 'State',
  chart: 'Calibration chart',
  divisions: 'divisions',
  frequencyHz: 'frequency',
  // lab settings
  name: 'Name',
  address: 'Address',
  accreditation: 'Accreditation statement',
  decisionRule: 'Decision rule',
  multipleOfU: 'Guard band w (U)',
  guardBandPpm: 'Guard band w (ppm)',
  reliabilityTarget: 'Reliability target',
  intervalMinMonths: 'Shortest interval (months)',
  intervalMaxMonths: 'Longest interval (months)',
  printSuggestedInterval: 'Print the suggested interval on certificates',
  // documents and signing
  replaceReason: 'Reason for the new revision',
  reason: 'Reason for the new revision',
  checkId: 'Check',
  person: 'Signer',
  passphrase: 'Passphrase',
  // standards
  certificateId: 'Certificate number',
  issuedBy: 'Issued by',
  calibratedOn: 'Calibrated on',
  dueOn: 'Due on',
  expandedUncertaintyPpm: 'Expanded uncertainty (ppm)',
  coverageFactor: 'Coverage factor k',
};

/** Lists whose items the form numbers from 1: "points[2]" is "Point 3". */
const ITEMS: Readonly<Record<string, string>> = {
  points: 'Point',
  readings: 'Reading',
  standards: 'Standard',
  certificates: 'Certificate',
  chart: 'Chart point',
  planHz: 'Plan frequency',
  checks: 'Check',
};

const PART = /([A-Za-z_$][\w$]*)(?:\[(\d+)\])?/g;

/**
 * The form's name for a machine field path: "points[2].readings[1].value" -> "Point 3, reading 2,
 * value"; "intervalMinMonths" -> "Shortest interval (months)". An unknown key is kept as it is.
 */
export function fieldLabel(path: string): string {
  if (path.startsWith('--') || path === 'FILE' || path === '(document)') return path;
  const parts: string[] = [];
  let previous = '';
  for (const m of path.matchAll(PART)) {
    const key = m[1] ?? '';
    const index = m[2];
    const after = previous;
    previous = key;
    // The sweep's file is what the form calls the sweep file.
    if (key === 'file' && after === 'sweep') continue;
    if (key === 'conditions' || key === 'spec' || key === 'settings' || key === 'rule') continue;
    if (index !== undefined) parts.push(`${ITEMS[key] ?? LABELS[key] ?? key} ${Number(index) + 1}`);
    else parts.push(LABELS[key] ?? key);
  }
  // "Point 3, reading 2, value": capital only at the start (kept where a word is an acronym).
  const text = parts
    .map((p, i) => (i > 0 && /^[A-Z][a-z]/.test(p) ? p.charAt(0).toLowerCase() + p.slice(1) : p))
    .join(', ');
  return text ? text.charAt(0).toUpperCase() + text.slice(1) : path;
}

/** A field path as it appears in a message: dotted keys, [n] indices. */
const PATH_IN_TEXT =
  /(?<![\w$.[\]"])(?:[a-z][\w$]*(?:\[\d+\])+(?:\.[a-z][\w$]*(?:\[\d+\])*)*|[a-z][\w$]*(?:\.[a-z][\w$]*(?:\[\d+\])*)+|[a-z]+[A-Z][\w$]*)(?![\w$(])/g;

/**
 * A refusal's message for people: the machine path at its start (and any other known path in
 * it) replaced by the form's label. Quoted values are left as they were typed.
 */
export function messageForPeople(message: string, field?: string): string {
  let text = message;
  if (field && text.startsWith(`${field}:`)) text = `${fieldLabel(field)}:${text.slice(field.length + 1)}`;
  // Outside quotes only: a value the person typed is shown unchanged.
  return text
    .split(/("(?:[^"\\]|\\.)*")/)
    .map((piece, i) =>
      i % 2 === 1
        ? piece
        : piece.replace(PATH_IN_TEXT, (p) => {
            const last = /([A-Za-z_$][\w$]*)(?:\[\d+\])*$/.exec(p)?.[1] ?? '';
            return LABELS[last] !== undefined || ITEMS[last] !== undefined || p.includes('[')
              ? fieldLabel(p)
              : p;
          }),
    )
    .join('');
}
