export interface HealthResponse {
  status: 'ok' | 'degraded';
  database: 'reachable' | 'unreachable';
  version: string;
  time: string;
}
