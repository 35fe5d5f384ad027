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
/**
 * A member id: letters and digits of any script, and `_ . : + / = -` after the first (Slack
 * `U123`, Teams `29:1a-b`, Entra GUIDs, console names like `zoë`), optionally behind the `~` of a
 * pseudonym; at most 128 characters. Emoji, control characters and escape sequences are not ids.
 */
const MEMBER_ID = /^~?[\p{L}\p{N}][\p{L}\p{M}\p{N}_.:+/=-]{0,127}$/u;

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
  if (!MEMBER_ID.test(id)) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `"${word}" is not a member: a member id is letters and digits (with . _ : - inside)`,
      { hint: `mention the member with @, as in: /influence ${usage}` },
    );
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
