/** The longest message Rholog stores or sends back; anything longer is cut short with an ellipsis. */
export const MAX_MESSAGE_CHARS = 300;

export function capMessage(message: string, max = MAX_MESSAGE_CHARS): string {
  if (message.length <= max) return message;
  return `${message.slice(0, max - 1)}…`;
}
