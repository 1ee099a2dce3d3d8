/**
 * An electronic signature as stored with a signed record and in its audit row: the signer's
 * printed name, the date and time, and the meaning of the signature (21 CFR 11.50), with the
 * signer's id and username. One type for the database, the services and the screens.
 */
export interface SignatureRecord {
  userId: number;
  username: string;
  /** The printed name shown with the signature. */
  displayName: string;
  /** What the signature means, e.g. "approved". */
  meaning: string;
  /** ISO 8601 date-time of signing. */
  signedAt: string;
}
