/** Every error response of the API has this body. `message` is written for a person and says how to fix it. */
export interface ApiErrorBody {
  error: {
    code: string;
    message: string;
    /** Field name -> problems, for 400 validation errors. */
    fields?: Record<string, string[]>;
  };
}
