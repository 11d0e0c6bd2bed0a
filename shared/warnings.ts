/**
 * A survivable problem found while reading or measuring: the result is still
 * returned, and the warning travels beside it to every place it is shown.
 */
export interface Warning {
  /** Stable snake_case code, e.g. `for_presentation`, `region_clipped`. */
  code: string;
  /** One plain sentence for the user. */
  message: string;
}
