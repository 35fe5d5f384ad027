/**
 * @module parse-input
 * Reading the words of a command: splitting on white space, member arguments in the forms chat
 * platforms produce (`<@U123>`, `<@U123|name>`, `@U123`, `U123`), and shares written as a
 * fraction or a percentage ("0.25", "25%").
 */
import { PlumblineError } from "../domain/errors.js";

/** The command's words, split on white space (empty input gives no words). */
export function words(text: string): string[] {
  const trimmed = text.trim();
  return trimmed === "" ? [] : trimmed.split(/\s+/);
}

const MENTION = /^<@([^|>\s]+)(?:\|[^>]*)?>$/;

/** The platform id in a member argument; ARG_BAD_VALUE when it is not one. */
export function parseMember(word: string | undefined, usage: string): string {
  if (word === undefined || word === "") {
    throw new PlumblineError("ARG_MISSING", `name the member, as in: /influence ${usage}`, {
      hint: `write /influence ${usage}, mentioning the member`,
    });
  }
  const mention = MENTION.exec(word);
  const id = mention ? mention[1] : word.startsWith("@") ? word.slice(1) : word;
  if (id === "" || /[<>|@\s]/.test(id)) {
    throw new PlumblineError("ARG_BAD_VALUE", `"${word}" is not a member`, {
      hint: `mention the member, as in: /influence ${usage}`,
    });
  }
  return id;
}

/**
 * A share written as "0.25", ".25" or "25%"; null when the word is not a number at all.
 * Range checks are the caller's.
 */
export function parseShare(word: string): number | null {
  const match = /^(\d+(?:\.\d+)?|\.\d+)(%?)$/.exec(word.trim());
  if (!match) return null;
  const value = Number(match[1]);
  return match[2] === "%" ? value / 100 : value;
}
