/**
 * `Content-Disposition: attachment` for a download whose file name may be any Unicode text
 * (RFC 6266 with RFC 5987 encoding): `filename="<ASCII fallback>"; filename*=UTF-8''<percent-encoded>`.
 * A header value must be Latin-1 (a name like "数据.csv" in a plain `filename="..."` makes the
 * response itself fail), so the plain parameter carries an ASCII stand-in and clients that read
 * `filename*` (every current browser, curl -J) get the real name.
 */
export function attachment(filename: string, fallback = "download"): string {
  // eslint-disable-next-line no-control-regex -- control characters never belong in a header
  const name = filename.replace(/[\u0000-\u001f\u007f]/g, "").trim() || fallback;
  const ascii =
    name
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .replace(/[^\x20-\x7e]/g, "_")
      .replace(/["\\%]/g, "_")
      .trim() || fallback;
  const encoded = encodeURIComponent(name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return ascii === name && !/[\\"%]/.test(name) ? `attachment; filename="${ascii}"` : `attachment; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
