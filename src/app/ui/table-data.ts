import { signal } from '@angular/core';
import { MatPaginator } from '@angular/material/paginator';
import { MatSort } from '@angular/material/sort';
import { MatTableDataSource } from '@angular/material/table';
import { Observable } from 'rxjs';
import { toApiProblem } from './api-error';

/**
 * Rows of one table plus their loading and error state. Sorting, filtering and paging happen
 * in the browser through MatTableDataSource.
 */
export class TableData<T> {
  readonly source = new MatTableDataSource<T>([]);
  readonly loading = signal(false);
  readonly problem = signal<string | null>(null);
  /** Whether rows have arrived at least once (distinguishes "empty" from "not loaded yet"). */
  readonly loaded = signal(false);
  readonly total = signal(0);
  readonly filter = signal('');

  attach(sort: MatSort | undefined, paginator: MatPaginator | undefined): void {
    if (sort) this.source.sort = sort;
    if (paginator) this.source.paginator = paginator;
  }

  load(rows: Observable<T[]>): void {
    this.loading.set(true);
    this.problem.set(null);
    rows.subscribe({
      next: (list) => this.set(list),
      error: (error: unknown) => {
        this.loading.set(false);
        this.problem.set(toApiProblem(error).message);
      },
    });
  }

  set(rows: T[]): void {
    this.source.data = rows;
    this.total.set(rows.length);
    this.loading.set(false);
    this.loaded.set(true);
  }

  /** Replaces one row (matched by id) or adds it at the top. */
  upsert(row: T & { id: number }): void {
    const rows = this.source.data as (T & { id: number })[];
    const index = rows.findIndex((candidate) => candidate.id === row.id);
    this.set(index >= 0 ? rows.map((candidate, i) => (i === index ? row : candidate)) : [row, ...rows]);
  }

  applyFilter(text: string): void {
    this.filter.set(text);
    this.source.filter = text.trim().toLowerCase();
    this.source.paginator?.firstPage();
  }
}
