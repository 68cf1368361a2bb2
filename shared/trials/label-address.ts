/**
 * The address a printed label's QR code opens. A shop prints labels once and scans them for months,
 * from phones on the shop's network, so an address only this computer can open (localhost, 127.x,
 * ::1) makes every label useless; it is allowed, because a single-machine shop may scan on the same
 * computer, but it is named as a problem wherever the address is shown.
 */

export interface LabelAddress {
  /** Base URL the labels use; a coupon's label opens `${url}/coupons/<id>`. */
  url: string;
  /** Where it comes from: the shop setting, or the server's APP_URL when the setting is empty. */
  source: 'setting' | 'app-url';
  loopback: boolean;
  /** Why a phone cannot open it, when it cannot. */
  warning: string | null;
}

/** Host names that always mean "this computer": localhost and its subdomains, 127.0.0.0/8, ::1, and the unspecified 0.0.0.0 and ::. */
export function isLoopbackHost(hostname: string): boolean {
  const h = hostname
    .toLowerCase()
    .replace(/^\[|\]$/g, '')
    .replace(/\.$/, '');
  if (h === 'localhost' || h.endsWith('.localhost')) return true;
  if (/^127(\.\d{1,3}){3}$/.test(h) || h === '0.0.0.0') return true;
  if (h === '::1' || h === '::' || h === '0:0:0:0:0:0:0:1') return true;
  // IPv4-mapped loopback, e.g. ::ffff:127.0.0.1 (the URL parser writes it as ::ffff:7f00:1).
  return /^::ffff:(127(\.\d{1,3}){3}|7f[0-9a-f]{2}:[0-9a-f]{1,4})$/.test(h);
}

/** The base URL without a trailing slash. */
export function normaliseBaseUrl(url: string): string {
  return url.trim().replace(/\/+$/, '');
}

export function labelAddress(setting: string | null | undefined, appUrl: string): LabelAddress {
  const fromSetting = setting != null && setting.trim() !== '';
  const url = normaliseBaseUrl(fromSetting ? setting : appUrl);
  let hostname = '';
  try {
    hostname = new URL(url).hostname;
  } catch {
    return { url, source: fromSetting ? 'setting' : 'app-url', loopback: false, warning: `${url} is not a web address a phone can open` };
  }
  const loopback = isLoopbackHost(hostname);
  return {
    url,
    source: fromSetting ? 'setting' : 'app-url',
    loopback,
    warning: loopback
      ? `${url} points at this computer itself (${hostname}), so a phone that scans a label cannot open it. Set the address the shop's phones use, e.g. http://<this computer's name or IP address>:<port>.`
      : null,
  };
}
