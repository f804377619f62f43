import { HttpErrorResponse } from '@angular/common/http';
import { FormControl, FormGroup } from '@angular/forms';
import { applyProblemToForm, toProblem } from './problem';

describe('problems on the client', () => {
  it('when a problem points at nested fields, then each error lands on its control and the rest come back', () => {
    const form = new FormGroup({
      email: new FormControl(''),
      blade: new FormGroup({ widthMm: new FormControl(0) }),
    });
    const left = applyProblemToForm(form, {
      type: '/problems/validation',
      title: 'Your request has mistakes in it',
      status: 400,
      errors: [
        { pointer: '#/email', detail: 'Enter a valid email address.' },
        { pointer: '#/blade/widthMm', detail: 'Must be more than 0.' },
        { pointer: '#/params/id', detail: 'Not a UUID.' },
      ],
    });
    expect(form.controls.email.getError('server')).toBe('Enter a valid email address.');
    expect(form.controls.blade.controls.widthMm.getError('server')).toBe('Must be more than 0.');
    expect(form.controls.email.touched).toBeTrue();
    expect(left).toEqual([{ pointer: '#/params/id', detail: 'Not a UUID.' }]);
  });

  it('when the connection is lost, then the problem says so plainly', () => {
    const problem = toProblem(new HttpErrorResponse({ status: 0, statusText: 'Unknown Error' }));
    expect(problem.title).toBe('No connection');
    expect(problem.detail).toContain('Wi-Fi');
  });

  it('when the server sends problem+json, then its fields are kept', () => {
    const body = { type: '/problems/not-allowed', title: 'Not allowed', status: 403, detail: 'Your role does not allow this.' };
    expect(toProblem(new HttpErrorResponse({ status: 403, error: body }))).toEqual({ ...body, errors: undefined });
  });
});
