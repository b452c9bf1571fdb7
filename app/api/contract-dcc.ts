// The Digital Calibration Certificate (DCC) of an issued certificate: the XML a certificate
// carries beside its record, handed out on its own for a receiving lab's software.
export interface DccQuery {
  /** The check whose current certificate is wanted... */
  checkId?: number;
  /** ...or a certificate by its number and revision (both together). */
  number?: string;
  revision?: number;
}

export interface DccFile {
  number: string;
  revision: number;
  checkId: number;
  checkRevision: number;
  /** Name of the DCC as attached to the certificate, e.g. C-2026-0001-r1-dcc.xml. */
  fileName: string;
  /** SHA-256 (hex) of the XML bytes. */
  sha256: string;
  /** The DCC itself, UTF-8 XML, byte for byte as the certificate carries it. */
  xml: string;
}

export interface DccApi {
  /** The DCC embedded in an issued certificate. */
  getDcc(query: DccQuery): Promise<DccFile>;
}

export const DCC_OPERATIONS = {
  getDcc: 'read',
} as const satisfies Record<keyof DccApi, 'read' | 'write'>;
