/** An error with an HTTP status; `field` names the request field at fault (validation). */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, field?: string) => new HttpError(400, message, field);
export const notFound = (what: string) => new HttpError(404, `${what} not found`);
export const conflict = (message: string, field?: string) => new HttpError(409, message, field);
