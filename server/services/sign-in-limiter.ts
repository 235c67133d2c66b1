/**
 * Counts failed sign-ins per key (account e-mail, client address) over a sliding minute.
 * In memory: one server process serves the API, and a restart forgetting counts is acceptable.
 */
export class SignInLimiter {
  private readonly failures = new Map<string, number[]>();

  constructor(
    private readonly limitPerMinute: number,
    private readonly now: () => number,
  ) {}

  /** Whether any of the keys has used up its failures for the current minute. */
  isBlocked(keys: string[]): boolean {
    return keys.some((k) => this.recent(k).length >= this.limitPerMinute);
  }

  recordFailure(keys: string[]): void {
    for (const k of keys) this.failures.set(k, [...this.recent(k), this.now()]);
  }

  private recent(key: string): number[] {
    const since = this.now() - 60_000;
    const list = (this.failures.get(key) ?? []).filter((t) => t > since);
    if (list.length) this.failures.set(key, list);
    else this.failures.delete(key);
    return list;
  }
}
