/** GET /api/health when the server and its database answer (otherwise a 503 problem). */
export interface Health {
  status: 'ok';
  database: 'up';
  /** The server's clock, ISO 8601. */
  time: string;
}
