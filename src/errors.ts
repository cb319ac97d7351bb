/**
 * The product's error catalogue. Codes are stable (clients and scripts rely on them) and never
 * reused: PHL_<AREA>_<WHAT>. The HTTP error handler maps these once.
 */
export class AppError extends Error {
  constructor(
    readonly code: string,
    readonly statusCode: number,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export class NotFoundError extends AppError {
  constructor(what: string, id: string | number) {
    super(
      `PHL_${what.toUpperCase().replace(/\W+/g, '_')}_NOT_FOUND`,
      404,
      `${what} ${id} not found`,
    );
  }
}

export class BadRequestError extends AppError {
  constructor(code: string, message: string, details?: unknown) {
    super(code, 400, message, details);
  }
}

export class ConflictError extends AppError {
  constructor(code: string, message: string, details?: unknown) {
    super(code, 409, message, details);
  }
}
