// Errors in the provider's JSON shape: {"error": {type, code, message, param}}.
// The HTTP status picks the SDK's typed error (400/404 → InvalidRequestError,
// 401 → AuthenticationError, 402 → CardError, 500 → APIError).
import { randomBytes } from 'node:crypto';
import type { NextFunction, Request, Response } from 'express';

export class ApiError extends Error {
  constructor(
    public status: number,
    message: string,
    public type = 'invalid_request_error',
    public code?: string,
    public param?: string,
  ) {
    super(message);
  }

  toJSON() {
    return { error: { type: this.type, code: this.code, message: this.message, param: this.param } };
  }
}

export const missing = (param: string) =>
  new ApiError(400, `Missing required param: ${param}.`, 'invalid_request_error', 'parameter_missing', param);

export const invalid = (param: string, message: string) =>
  new ApiError(400, message, 'invalid_request_error', 'parameter_invalid', param);

export const noSuch = (kind: string, id: string, param = 'id') =>
  new ApiError(404, `No such ${kind}: '${id}'`, 'invalid_request_error', 'resource_missing', param);

export function requestId(): string {
  return 'req_' + randomBytes(7).toString('hex');
}

// Last middleware of the /v1 router: anything thrown becomes provider-shaped.
export function apiErrorHandler(err: unknown, _req: Request, res: Response, _next: NextFunction): void {
  const apiErr =
    err instanceof ApiError ? err : new ApiError(500, 'Internal error in the payments fake.', 'api_error');
  if (!(err instanceof ApiError)) console.error('[payments-fake]', err);
  res.status(apiErr.status).set('request-id', requestId()).json(apiErr.toJSON());
}
