import { unitTopic } from '../../shared/contracts/topics';
import { testDeviceSecret } from '../helpers/device-secrets';
import { rawConnect, qos1, type RawClient } from '../helpers/raw-mqtt';
import { sample } from '../helpers/fake-unit';

/** A unit that keeps every reading until the broker acknowledges it, and sends the rest again after a reconnect. */
export class Unit {
  seq = 0;
  readonly pending = new Map<number, number>(); // message id → seq
  readonly acked = new Set<number>();
  c: RawClient | undefined;
  private seen = 0;
  private nextId = 1;
  lastAckAt = 0;

  constructor(
    readonly serial: string,
    private readonly t0: number,
  ) {}

  async connect(port: number): Promise<void> {
    const { c, connack } = await rawConnect(port, this.serial, testDeviceSecret(this.serial));
    if (connack.returnCode !== 0) throw new Error(`${this.serial} refused: ${connack.returnCode}`);
    this.c = c;
    this.seen = 0;
    const resend = [...this.pending.values()];
    this.pending.clear();
    for (const s of resend) this.send(s, true);
  }

  publish(): void {
    if (!this.c || this.c.isClosed()) return;
    this.send(this.seq++, false);
  }

  /** Takes in the PUBACKs received since the last look. */
  poll(): void {
    const got = this.c?.received ?? [];
    for (; this.seen < got.length; this.seen++) {
      const p = got[this.seen]!;
      if (p.cmd !== 'puback' || p.messageId === undefined) continue;
      const s = this.pending.get(p.messageId);
      if (s === undefined) continue;
      this.pending.delete(p.messageId);
      this.acked.add(s);
      this.lastAckAt = Date.now();
    }
  }

  private send(s: number, dup: boolean): void {
    const id = this.nextId;
    this.nextId = (this.nextId % 65535) + 1;
    this.pending.set(id, s);
    this.c!.send(qos1(unitTopic(this.serial, 'telemetry'), JSON.stringify(sample(s, this.t0 + s * 1000)), id, false, dup));
  }
}
