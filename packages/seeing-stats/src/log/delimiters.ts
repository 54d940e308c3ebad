/**
 * The delimiters a person may choose for a log (analyzer --delimiter, the upload's read options, the wizard):
 * comma, semicolon, tab, a single space (every space separates, so two spaces make an empty field between them),
 * or whitespace (any run of spaces and tabs is one separator, and blanks at the start and end of a line are not
 * fields: the columns of a log aligned for the eye).
 */
export const DELIMITER_CHOICES = [',', ';', 'tab', 'space', 'whitespace'] as const;

export type DelimiterChoice = (typeof DELIMITER_CHOICES)[number];

/** The delimiter value that stands for "runs of spaces or tabs" wherever a delimiter string is passed on. */
export const WHITESPACE_DELIMITER = 'whitespace';

/** The delimiter string the reader splits at for a person's choice. */
export function delimiterOfChoice(choice: DelimiterChoice): string {
  switch (choice) {
    case 'tab':
      return '\t';
    case 'space':
      return ' ';
    case 'whitespace':
      return WHITESPACE_DELIMITER;
    default:
      return choice;
  }
}

/** The choice that gives this delimiter string back (the inverse of delimiterOfChoice). */
export function choiceOfDelimiter(delimiter: string): DelimiterChoice {
  if (delimiter === '\t') return 'tab';
  if (delimiter === ' ') return 'space';
  if (delimiter === ';') return ';';
  if (delimiter === WHITESPACE_DELIMITER) return 'whitespace';
  return ',';
}

/** A delimiter in words, for messages and screens. */
export function delimiterName(delimiter: string): string {
  switch (delimiter) {
    case ',':
      return 'comma';
    case ';':
      return 'semicolon';
    case '\t':
      return 'tab';
    case ' ':
      return 'single space';
    case WHITESPACE_DELIMITER:
      return 'runs of spaces or tabs';
    default:
      return `"${delimiter}"`;
  }
}

/**
 * The choice a person typed: ',', ';', 'tab', 'space' or 'whitespace' (also 'comma', 'semicolon'); throws a
 * RangeError naming the text and the choices otherwise.
 */
export function parseDelimiterChoice(text: string): DelimiterChoice {
  const value = text.trim().toLowerCase();
  if (value === 'comma') return ',';
  if (value === 'semicolon') return ';';
  if ((DELIMITER_CHOICES as readonly string[]).includes(value)) return value as DelimiterChoice;
  throw new RangeError(`the delimiter must be one of ',', ';', tab, space or whitespace (runs of spaces or tabs), got "${text}"`);
}

/** How a person says a log is laid out: the delimiter (detected when absent) and the line naming the columns. */
export interface LayoutChoices {
  delimiter?: DelimiterChoice | undefined;
  /** 1-based line of the column names; the lines above it are preamble. Absent: the first non-comment line. */
  headerLine?: number | undefined;
}

/** The text reader's layout for a person's choices. */
export function layoutOf(choices: LayoutChoices): { delimiter?: string; headerLine?: number } {
  return {
    ...(choices.delimiter !== undefined ? { delimiter: delimiterOfChoice(choices.delimiter) } : {}),
    ...(choices.headerLine !== undefined ? { headerLine: choices.headerLine } : {}),
  };
}

/** A line cut at runs of spaces and tabs, blanks at its ends ignored (a blank line is one empty field). */
export function splitWhitespace(text: string): string[] {
  const trimmed = text.trim();
  return trimmed === '' ? [''] : trimmed.split(/[ \t]+/);
}
