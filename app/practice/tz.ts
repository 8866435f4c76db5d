// The student's time zone, for "today" and the day streak: the browser keeps its UTC offset in a cookie that the
// server reads. Until the first visit has set it, days are UTC days.
export const TZ_COOKIE = "fretcall-tz";
const MAX_OFFSET_MINUTES = 14 * 60;

/** Call from an effect: stores getTimezoneOffset() (minutes, UTC − local) for a year. */
export function rememberTimeZone() {
  document.cookie = `${TZ_COOKIE}=${new Date().getTimezoneOffset()}; path=/; max-age=31536000; samesite=lax`;
}

export function tzOffsetOf(request: Request): number {
  const raw = new RegExp(`(?:^|;\\s*)${TZ_COOKIE}=(-?\\d{1,4})(?:;|$)`).exec(request.headers.get("Cookie") ?? "")?.[1];
  const minutes = Number(raw);
  return raw !== undefined && Math.abs(minutes) <= MAX_OFFSET_MINUTES ? minutes : 0;
}
