/** Failed password sign-ins allowed per address within the window before further attempts are refused. */
export const signInRateLimit = { maxFailures: 5, windowMinutes: 15 } as const;

export function isSignInLocked(recentFailures: number): boolean {
  return recentFailures >= signInRateLimit.maxFailures;
}
