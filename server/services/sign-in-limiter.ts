import { RateLimiterMemory, RateLimiterRes, type RateLimiterAbstract } from 'rate-limiter-flexible';

/**
 * Attempts per key (an account, a client address) over a fixed minute. An attempt is taken *before* the password is
 * checked, so a parallel burst cannot slip past the count; a successful attempt is given back, so only failures add up.
 * The server passes a counter kept in the database (server/data/sign-in-attempt-store.ts), shared by every server;
 * given a number, the counts stay in this process.
 */
export class SignInLimiter {
  private readonly limiter: RateLimiterAbstract;

  constructor(limit: number | RateLimiterAbstract) {
    this.limiter = typeof limit === 'number' ? new RateLimiterMemory({ points: limit, duration: 60 }) : limit;
  }

  /** Takes one attempt from each key; false when any key had none left. */
  async take(keys: readonly string[]): Promise<boolean> {
    let ok = true;
    for (const key of keys) {
      try {
        await this.limiter.consume(key);
      } catch (err) {
        if (!(err instanceof RateLimiterRes)) throw err;
        ok = false;
      }
    }
    return ok;
  }

  /** Gives back the attempt taken from each key (the password was right). */
  async giveBack(keys: readonly string[]): Promise<void> {
    for (const key of keys) await this.limiter.reward(key, 1);
  }
}
