/** The sync endpoint lives on the same origin as the app: ws(s)://host/sync/<room>. */
export function syncBaseUrl(loc: Location = location): string {
  return `${loc.protocol === 'https:' ? 'wss:' : 'ws:'}//${loc.host}/sync`;
}
