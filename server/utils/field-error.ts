/**
 * A 400 about one form field, shaped exactly like a failed readValidatedBody(validator(...)) answer
 * (h3 nests the validator's error as `data`), so the forms read both the same way.
 */
export function fieldError(path: string, message: string) {
  const text = `${path}: ${message}`
  return createError({ status: 400, statusMessage: 'Validation Error', message: text, data: { message: text, statusCode: 400, data: { issues: [{ path, message }] } } })
}
