import type { DemoHistoryView } from '../../shared/contracts/demo-history';
import type { HistoryRepository } from '../data/history-repository';

/** What the admin page shows of the demo's past: the fill still running in the background, else the newest one. */
export class DemoHistoryStatus {
  constructor(private readonly repo: HistoryRepository) {}

  async current(): Promise<DemoHistoryView> {
    const p = (await this.repo.unfinished()).filter((x) => x.state !== 'failed').at(-1) ?? (await this.repo.latest());
    if (!p) return { state: 'none', daysTotal: 0, daysDone: 0, message: 'no generated past', plannedAt: null, updatedAt: null };
    return {
      state: p.state,
      daysTotal: p.daysTotal,
      daysDone: p.daysDone,
      message: p.message,
      plannedAt: p.plannedAt.toISOString(),
      updatedAt: p.updatedAt.toISOString(),
    };
  }
}
