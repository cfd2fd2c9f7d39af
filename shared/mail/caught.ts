/** One message the local mail stand-in caught, as the development page shows it. */
export interface CaughtMessage {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  /** The message's own headers (unfolded, encoded words decoded). */
  headers: Array<{ name: string; value: string }>;
  /** The plain-text body. */
  text: string;
}
