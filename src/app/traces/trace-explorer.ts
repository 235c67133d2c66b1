import { ChangeDetectionStrategy, Component } from '@angular/core';
@Component({ selector: 'bw-trace-explorer', template: `<section class="page"><h1>Trace explorer</h1></section>`, changeDetection: ChangeDetectionStrategy.OnPush })
export class TraceExplorer {}
