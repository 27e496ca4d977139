// Where to go after signing in. Pure.

/**
 * The path to follow, or null when `value` would leave the app. The value is parsed the way the
 * browser will parse it (`new URL(value, appUrl)`: backslashes, tabs and newlines in it are
 * treated as the browser treats them), and only a result on the app's own origin is kept, as
 * path + query + fragment, so what the browser is sent to is exactly what was checked.
 */
export function safeCallbackUrl(value: string | null | undefined, appUrl: string): string | null {
  if (!value) return null;
  let base: URL;
  let target: URL;
  try {
    base = new URL(appUrl);
    target = new URL(value, base);
  } catch {
    return null;
  }
  if (target.origin !== base.origin) return null;
  return `${target.pathname}${target.search}${target.hash}`;
}
