/** `GET /api/config`: deployment settings the web app needs. Nothing secret. */
export interface AppConfig {
  /** Online map tiles, when the deployment has a tile server; null means the shipped country outlines (offline). */
  mapTiles: { url: string; attribution: string } | null;
}
