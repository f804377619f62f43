import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MathsCaution } from './ui/caution';
import { FigureField } from './ui/figure-field';
import { FormulaLine } from './ui/formula-line';
import { MathsCard } from './ui/maths-card';
import { OutcomeNote } from './ui/outcome-note';
import { Reading } from './ui/reading';

/** What every calculator card's template uses. */
export const CARD_KIT = [
  ReactiveFormsModule,
  MatButtonModule,
  MatButtonToggleModule,
  MatIconModule,
  MatSelectModule,
  MathsCard,
  MathsCaution,
  FigureField,
  FormulaLine,
  OutcomeNote,
  Reading,
] as const;
