/**
 * What the shared result fields mean, in one place: appended to the input schemas' descriptions of
 * every operation with waiting positions (the CLI help and the API listing are built from them),
 * with the same definitions as the simulation result (lib/simulation/result.ts) reported beside them.
 */
export const WAITING_MEASURES =
  "timeCongestion = share of time all N servers are busy; " +
  "waitingProbability and abandonmentProbability = shares of admitted attempts (given a server or a waiting position; with retrials repeated attempts count too), as the simulation reports them; " +
  "lossProbability = share of fresh calls never served";

/** For the results that also report the full system. */
export const FULL_CONGESTION = "fullCongestion = share of time servers and waiting positions are all taken";
