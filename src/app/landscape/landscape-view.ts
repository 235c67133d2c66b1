import { ChangeDetectionStrategy, Component } from '@angular/core';
@Component({ selector: 'bw-landscape-view', template: `<section class="page"><h1>Landscape</h1></section>`, changeDetection: ChangeDetectionStrategy.OnPush })
export class LandscapeView {}
