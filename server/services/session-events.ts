/** Which sessions just ended: one session, or every session of a user (but one, when the user kept the current one). */
export type SessionsEnded = { sessionId: string } | { userId: number; exceptSessionId?: string };

/**
 * In-process notice from the services that end sessions (sign-out, user changes, password changes) to the transports
 * that hold connections open on them (the live socket), so those close at once rather than at their next check.
 */
export class SessionEvents {
  private readonly listeners = new Set<(e: SessionsEnded) => void>();

  /** Registers a listener; returns the function that removes it. Listeners must not throw. */
  on(listener: (e: SessionsEnded) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  emit(e: SessionsEnded): void {
    for (const l of this.listeners) l(e);
  }
}

/** Whether a notice covers a given session of a given user. */
export function endsSession(e: SessionsEnded, userId: number, sessionId: string): boolean {
  if ('sessionId' in e) return e.sessionId === sessionId;
  return e.userId === userId && e.exceptSessionId !== sessionId;
}
