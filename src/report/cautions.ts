/**
 * @module cautions
 * The cautions of DESIGN.md §7, in one place: every digest, check, how-to-read, CLI summary and the
 * README carry them.
 */

/** The one-line form, for the foot of every posted figure. */
export const CAUTIONS_LINE =
  "Rough proxy for attention among opted-in members, not a measure of anyone's worth or work; never use it for performance or HR decisions.";

/** The full form, for the how-to-read, the README and the CLI. */
export const CAUTIONS_FULL = [
  "These figures are a rough proxy for attention: they count replies and mentions between members who opted in, nothing else. Silence is not agreement, and a quiet member may be the one everyone reads.",
  "They are not a measure of a person's worth, skill or work. Never use them for performance reviews, pay, promotion or any HR decision.",
  "Before rolling plumbline out at work, consult your data protection officer, a works council where one exists, and local law; an impact assessment is likely required for workplace use.",
] as const;
