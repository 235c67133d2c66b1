import { DestroyRef, inject, Injectable, InjectionToken, Injector, signal } from '@angular/core';
import { Router } from '@angular/router';
import { Observable, Subject } from 'rxjs';
import type { LiveClientMessage, LiveServerMessage } from '../../../shared/contracts/live';
import { Session } from '../auth/session';

/** Close code the server sends when the session behind the socket has ended (signed out, disabled, role changed). */
export const SESSION_ENDED_CLOSE = 4401;

/** What the dashboard shows about its live link. */
export type LinkState = 'connecting' | 'live' | 'reconnecting' | 'offline';

/** Creates the socket; replaced in tests. */
export const LIVE_SOCKET_FACTORY = new InjectionToken<(url: string) => WebSocket>('LIVE_SOCKET_FACTORY', {
  providedIn: 'root',
  factory: () => (url: string) => new WebSocket(url),
});

/** Delay before reconnect attempt `n` (1-based): 1 s, 2 s, 4 s … capped at 15 s. */
export function reconnectDelayMs(attempt: number): number {
  return Math.min(15_000, 1000 * 2 ** Math.max(0, attempt - 1));
}

type Topic = Omit<Extract<LiveClientMessage, { type: 'subscribe' }>, 'type'>;
const topicKey = (t: Topic) => (t.fleet ? 'fleet' : t.siteId !== undefined ? `site:${t.siteId}` : `unit:${t.unitId}`);

/**
 * The one WebSocket to `/ws`, shared by every screen. Keeps a count of subscriptions per topic; after every
 * (re)connect it subscribes again, and the server answers each subscribe with a fresh snapshot.
 */
@Injectable({ providedIn: 'root' })
export class LiveConnection {
  private readonly create = inject(LIVE_SOCKET_FACTORY);
  private readonly injector = inject(Injector);
  private socket: WebSocket | null = null;
  private attempt = 0;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private readonly topics = new Map<string, { topic: Topic; count: number }>();
  /** Holders of the socket that subscribe to no topic (they want the messages meant for this person only). */
  private holders = 0;
  private readonly incoming = new Subject<LiveServerMessage>();
  private readonly stateSignal = signal<LinkState>('offline');
  private readonly nextRetry = signal<number | null>(null);

  /** Current link state. */
  readonly state = this.stateSignal.asReadonly();
  /** When the next reconnect attempt happens [epoch ms], while reconnecting. */
  readonly retryAt = this.nextRetry.asReadonly();
  /** Every message from the server. */
  readonly messages: Observable<LiveServerMessage> = this.incoming.asObservable();

  /** Subscribes to a topic for as long as `destroyRef` lives (a component's). */
  watch(topic: Topic, destroyRef: DestroyRef = inject(DestroyRef)): void {
    const key = topicKey(topic);
    const entry = this.topics.get(key);
    if (entry) entry.count++;
    else {
      this.topics.set(key, { topic, count: 1 });
      this.send({ type: 'subscribe', ...topic });
    }
    this.ensureOpen();
    destroyRef.onDestroy(() => this.unwatch(topic));
  }

  /**
   * Keeps the socket open for as long as `destroyRef` lives without subscribing to anything: the server's messages for
   * this person alone (notifications) arrive on any open socket.
   */
  hold(destroyRef: DestroyRef = inject(DestroyRef)): void {
    this.holders++;
    this.ensureOpen();
    destroyRef.onDestroy(() => {
      this.holders--;
      if (!this.topics.size && !this.holders) this.close();
    });
  }

  /** Reconnects at once (the "try now" button). */
  reconnectNow(): void {
    if (this.state() === 'live' || this.state() === 'connecting') return;
    this.clearTimer();
    this.open();
  }

  private unwatch(topic: Topic): void {
    const key = topicKey(topic);
    const entry = this.topics.get(key);
    if (!entry) return;
    if (--entry.count > 0) return;
    this.topics.delete(key);
    this.send({ type: 'unsubscribe', ...topic });
    if (!this.topics.size && !this.holders) this.close();
  }

  private ensureOpen(): void {
    if (!this.socket && !this.timer) this.open();
  }

  private open(): void {
    const location = globalThis.location;
    const url = `${location.protocol === 'https:' ? 'wss' : 'ws'}://${location.host}/ws`;
    this.stateSignal.set(this.attempt === 0 ? 'connecting' : 'reconnecting');
    let socket: WebSocket;
    try {
      socket = this.create(url);
    } catch {
      this.scheduleReconnect();
      return;
    }
    this.socket = socket;
    socket.onopen = () => {
      this.attempt = 0;
      this.nextRetry.set(null);
      this.stateSignal.set('live');
      for (const { topic } of this.topics.values()) this.send({ type: 'subscribe', ...topic });
    };
    socket.onmessage = (event: MessageEvent) => {
      try {
        this.incoming.next(JSON.parse(String(event.data)) as LiveServerMessage);
      } catch {
        // A malformed frame is ignored; the next snapshot repairs the state.
      }
    };
    socket.onclose = (event?: CloseEvent) => {
      if (this.socket !== socket) return;
      this.socket = null;
      if (event?.code === SESSION_ENDED_CLOSE) this.sessionEnded();
      else if (this.topics.size || this.holders) this.scheduleReconnect();
      else this.stateSignal.set('offline');
    };
  }

  /** Reconnecting would only be refused: go to sign-in, coming back here afterwards. */
  private sessionEnded(): void {
    this.clearTimer();
    this.attempt = 0;
    this.nextRetry.set(null);
    this.stateSignal.set('offline');
    const session = this.injector.get(Session);
    // A sign-out from this dashboard ends the session too; the sign-out (or whoever dropped the session) goes to sign-in.
    if (session.signingOut || !session.me()) return;
    session.forget();
    const router = this.injector.get(Router);
    const here = router.url;
    void router.navigate(['/sign-in'], { queryParams: { returnUrl: here.startsWith('/sign-in') ? undefined : here } });
  }

  private scheduleReconnect(): void {
    this.attempt++;
    const delay = reconnectDelayMs(this.attempt);
    this.stateSignal.set('reconnecting');
    this.nextRetry.set(Date.now() + delay);
    this.clearTimer();
    this.timer = setTimeout(() => {
      this.timer = null;
      this.open();
    }, delay);
  }

  private close(): void {
    this.clearTimer();
    const s = this.socket;
    this.socket = null;
    this.attempt = 0;
    this.nextRetry.set(null);
    this.stateSignal.set('offline');
    s?.close();
  }

  private clearTimer(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
  }

  private send(msg: LiveClientMessage): void {
    if (this.socket?.readyState === 1 /* OPEN */) this.socket.send(JSON.stringify(msg));
  }
}
