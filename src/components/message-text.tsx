/**
 * Messages from the model check, the region check and fits mark names and code with backticks
 * ("`sigma` is used before it is declared"). These helpers show such spans as inline code instead
 * of raw backticks: `MessageText` in React views, `messageElement` where a DOM node is needed (the
 * editor's lint tooltips). One rule for both: `messageParts`.
 */

export interface MessagePart {
  text: string;
  code: boolean;
}

/**
 * Splits a message at backtick spans. A span opened with n backticks closes at the next run of
 * exactly n backticks (so ``a `b` c`` holds a backtick), and one space just inside each end is
 * dropped, as in markdown. An unmatched backtick stays plain text.
 */
export function messageParts(message: string): MessagePart[] {
  const out: MessagePart[] = [];
  const push = (text: string, code: boolean) => {
    if (text === '') return;
    const last = out[out.length - 1];
    if (last && !last.code && !code) last.text += text;
    else out.push({ text, code });
  };
  let i = 0;
  let plainFrom = 0;
  while (i < message.length) {
    if (message[i] !== '`') {
      i++;
      continue;
    }
    let n = 0;
    while (message[i + n] === '`') n++;
    // Find a closing run of exactly n backticks.
    let j = i + n;
    let close = -1;
    while (j < message.length) {
      if (message[j] !== '`') {
        j++;
        continue;
      }
      let m = 0;
      while (message[j + m] === '`') m++;
      if (m === n) {
        close = j;
        break;
      }
      j += m;
    }
    if (close < 0) {
      i += n;
      continue;
    }
    push(message.slice(plainFrom, i), false);
    let inner = message.slice(i + n, close);
    if (inner.length > 2 && inner.startsWith(' ') && inner.endsWith(' ') && inner.trim() !== '') inner = inner.slice(1, -1);
    push(inner, true);
    i = close + n;
    plainFrom = i;
  }
  push(message.slice(plainFrom), false);
  return out;
}

/** A message with its backtick spans as inline code. */
export function MessageText({ text }: { text: string }) {
  return (
    <>
      {messageParts(text).map((p, k) =>
        p.code ? (
          <code key={k} className="sl-msg-code">
            {p.text}
          </code>
        ) : (
          <span key={k}>{p.text}</span>
        ),
      )}
    </>
  );
}

/** The same as a DOM element (for places that take a node, such as lint tooltips). */
export function messageElement(text: string, doc: Document = document): HTMLElement {
  const el = doc.createElement('span');
  for (const p of messageParts(text)) {
    if (p.code) {
      const c = doc.createElement('code');
      c.className = 'sl-msg-code';
      c.textContent = p.text;
      el.appendChild(c);
    } else el.appendChild(doc.createTextNode(p.text));
  }
  return el;
}
