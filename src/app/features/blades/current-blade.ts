import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { RouterLink } from '@angular/router';
import { UnitChoice } from '../workshop-maths/unit-choice';
import { areaText } from './area';
import { BladeApi } from './blade-api';

/** The blade on a machine now and its break-in, in a line or two; for the machine page. */
@Component({
  selector: 'sw-current-blade',
  imports: [RouterLink],
  template: `
    @if (blades.value(); as b) {
      @if (b.current; as c) {
        <p class="blade">
          <strong>{{ c.bladeType.label }}</strong>
          <span>
            @if (c.breakIn.complete) {
              Run in.
            } @else {
              Breaking in: {{ area(c.breakIn.remaining) }} still to cut at about half feed.
            }
          </span>
          <a [routerLink]="['/blades/machines', machineId()]">Blade history and cut log</a>
        </p>
      } @else {
        <p class="blade">No blade recorded yet. <a [routerLink]="['/blades/machines', machineId()]">Blade history</a></p>
      }
    }
  `,
  styles: `
    .blade {
      display: flex;
      flex-direction: column;
      gap: 2px;
      margin: 0;
    }
    a {
      min-height: 48px;
      display: inline-flex;
      align-items: center;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CurrentBlade {
  private readonly api = inject(BladeApi);
  private readonly units = inject(UnitChoice);
  readonly machineId = input.required<string>();
  protected readonly blades = rxResource({ params: () => this.machineId(), stream: ({ params }) => this.api.machine(params) });

  protected area(a: Parameters<typeof areaText>[0]) {
    return areaText(a, this.units.system());
  }
}
