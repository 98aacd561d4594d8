// Errors in the Stripe API's wire format: a status that picks the SDK's error class and a body
// `{ error: { type, code, decline_code, message, param } }`.

export type ErrorType = 'invalid_request_error' | 'card_error' | 'api_error' | 'idempotency_error' | 'rate_limit_error'

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly type: ErrorType,
    message: string,
    readonly extra: { code?: string, param?: string, decline_code?: string } = {},
  ) {
    super(message)
  }

  body(): { error: Record<string, string> } {
    const error: Record<string, string> = { type: this.type, message: this.message }
    if (this.extra.code) error.code = this.extra.code
    if (this.extra.param) error.param = this.extra.param
    if (this.extra.decline_code) error.decline_code = this.extra.decline_code
    return { error }
  }
}

export const missing = (param: string) =>
  new ApiError(400, 'invalid_request_error', `Missing required param: ${param}.`, { code: 'parameter_missing', param })

export const invalid = (param: string, message: string, code = 'parameter_invalid_string') =>
  new ApiError(400, 'invalid_request_error', message, { code, param })

export const noSuch = (what: string, id: string, param = 'id') =>
  new ApiError(404, 'invalid_request_error', `No such ${what}: '${id}'`, { code: 'resource_missing', param })

export const unknownParam = (param: string) =>
  new ApiError(400, 'invalid_request_error', `Received unknown parameter: ${param}`, { code: 'parameter_unknown', param })
