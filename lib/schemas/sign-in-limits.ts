// Sign-in throttling policy, pure numbers shared by the queries that enforce it and the messages that explain it.
// The figures are common practice, no source.
export const signInLimits = {
  windowMinutes: 15,
  /** Failed password attempts one client may make for one address within the window. */
  perAddressAndClient: 5,
  /** Failed password attempts one client may make over all addresses within the window. */
  perClient: 20,
  /** Failed attempts for one address from all clients after which only clients that have not failed may try. */
  perAddress: 10,
  /** Sign-in links sent to one address within the window; further requests are answered alike but send nothing. */
  linksPerAddress: 3,
  /** How long a sign-in link works. */
  linkMaxAgeHours: 24,
} as const;
