/** Only paths inside the app are followed after sign-in (no open redirects). */
export function safeReturnUrl(value: string | null | undefined, fallback = '/benches'): string {
  return value && value.startsWith('/') && !value.startsWith('//') ? value : fallback;
}
