/** One field-level problem, pointing into the request body (RFC 6901 JSON pointer in a URI fragment). */
export interface FieldProblem {
  pointer: string;
  detail: string;
}

/** RFC 9457 problem details, as every API error is sent. */
export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  errors?: FieldProblem[];
  [extension: string]: unknown;
}

/** The one error class the API throws on purpose; the central handler turns it into problem+json. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly slug: string,
    readonly title: string,
    detail?: string,
    readonly errors?: FieldProblem[],
    readonly extensions: Record<string, unknown> = {},
  ) {
    super(detail ?? title);
  }

  get detail(): string {
    return this.message;
  }

  static badRequest(detail: string, errors?: FieldProblem[]) {
    return new AppError(400, 'validation', 'Your request has mistakes in it', detail, errors);
  }
  static unauthorised(detail = 'Sign in to continue.') {
    return new AppError(401, 'not-signed-in', 'Not signed in', detail);
  }
  static forbidden(detail = 'Your role does not allow this.') {
    return new AppError(403, 'not-allowed', 'Not allowed', detail);
  }
  static notFound(detail = 'There is nothing here.') {
    return new AppError(404, 'not-found', 'Not found', detail);
  }
  static conflict(detail: string) {
    return new AppError(409, 'conflict', 'This clashes with what is stored', detail);
  }
}

export const problemType = (slug: string) => `/problems/${slug}`;

/** Turn a path of keys and indexes into a '#/a/0/b' pointer, escaping per RFC 6901. */
export function pointerFor(path: readonly PropertyKey[]): string {
  const parts = path.map((p) => String(p).replace(/~/g, '~0').replace(/\//g, '~1'));
  return '#/' + parts.join('/');
}
