/**
 * A check's message may end with the reason the release states for a tolerance or an
 * extrapolation (generators/checks: "…; reason stated: X" and "…(allowed 25 %, stated by the
 * release: X)"). The same reason repeats on every check it covers, so pages show the measured part
 * and fold the reason away. Nothing is lost: head + label + reason + tail is the message.
 */
export interface MessageParts {
  /** The measured part, before the label that introduces the reason. */
  head: string;
  /** That label (e.g. "; reason stated: "); '' when the message states no reason. */
  label: string;
  /** The release's own words; '' when the message states none. */
  reason: string;
  /** What follows the reason (a closing parenthesis), usually ''. */
  tail: string;
}

const LABELS = ['; reason stated: ', ', stated by the release: '];
/** Reasons shorter than this stay inline: folding them would hide less than the control shows. */
export const FOLD_MIN_CHARS = 80;

export function splitStatedReason(message: string): MessageParts {
  for (const label of LABELS) {
    const at = message.indexOf(label);
    if (at < 0) continue;
    const head = message.slice(0, at);
    let reason = message.slice(at + label.length);
    let tail = '';
    // "(allowed …, stated by the release: X)": the parenthesis opened in the head closes after X.
    const open = (head.match(/\(/g) ?? []).length - (head.match(/\)/g) ?? []).length;
    if (open > 0 && reason.endsWith(')')) {
      reason = reason.slice(0, -1);
      tail = ')';
    }
    if (reason.length < FOLD_MIN_CHARS) break;
    return { head, label, reason, tail };
  }
  return { head: message, label: '', reason: '', tail: '' };
}
