/**
 * @module palette
 * The charts' colours: the eight-colour palette of Okabe & Ito (2008, "Color Universal Design
 * (CUD): how to make figures and presentations that are friendly to colorblind people",
 * jfly.uni-koeln.de), also recommended by Wong (2011, "Points of view: Color blindness", Nature
 * Methods 8:441). Colour never carries meaning alone: every mark also has a text label.
 */

/** Okabe–Ito colours by their published names (hex values from memory of the 2008 page). */
export const OKABE_ITO = Object.freeze({
  black: "#000000",
  orange: "#E69F00",
  skyBlue: "#56B4E9",
  bluishGreen: "#009E73",
  yellow: "#F0E442",
  blue: "#0072B2",
  vermillion: "#D55E00",
  reddishPurple: "#CC79A7",
});

/** What each colour means in plumbline's charts. */
export const CHART_COLOURS = Object.freeze({
  /** A member's share bar, a node, the effective-voices line. */
  share: OKABE_ITO.blue,
  /** The interval: band fill and whisker marks. */
  interval: OKABE_ITO.skyBlue,
  /** The line (threshold) and anything above it. */
  line: OKABE_ITO.vermillion,
  /** Attention arrows. */
  attention: OKABE_ITO.bluishGreen,
  /** The second period of a compare (drawn as a square; orange would reach only 2.2:1 on white). */
  periodB: OKABE_ITO.vermillion,
  /** Text and axes. */
  ink: "#1a1a1a",
  /** Grid lines and axis ticks. */
  grid: "#c8c8c8",
  /** Secondary text. */
  muted: "#555555",
});
