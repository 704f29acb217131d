/**
 * The panel's HTML document, built by the extension host (src/extension/panel.ts) and by the
 * browser test from the same function. It carries no data: the report arrives by postMessage.
 * Pure string building, no DOM and no vscode, so both sides can import it.
 */
import { CAUTION } from '../src/core/text/format';

export interface ShellOptions {
  /** URI of dist/webview.js as the webview may load it (`asWebviewUri`). */
  scriptUri: string;
  /** `webview.cspSource`: the origin styles, images and fonts may come from. */
  cspSource: string;
  /** Fresh per document, from a cryptographic source (the host uses crypto.randomBytes). */
  nonce: string;
}

/** Content-Security-Policy of the panel: nothing by default, the one script by its nonce. Styles
 *  are constructed stylesheets (adoptedStyleSheets) and CSSOM properties, which style-src does
 *  not restrict; the toolkit's one probe <style> element carries the nonce (it reads it from the
 *  `csp-nonce` meta tag); files would come only from the webview's own resource origin. */
function panelCsp(o: Pick<ShellOptions, 'cspSource' | 'nonce'>): string {
  return [
    "default-src 'none'",
    `script-src 'nonce-${o.nonce}'`,
    `style-src ${o.cspSource} 'nonce-${o.nonce}'`,
    `img-src ${o.cspSource} data:`,
    `font-src ${o.cspSource}`,
  ].join('; ');
}

export function panelShellHtml(o: ShellOptions): string {
  if (!/^[A-Za-z0-9+/=_-]{16,}$/.test(o.nonce)) throw new Error('panel nonce must be at least 16 base64 characters');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${attr(panelCsp(o))}">
<meta property="csp-nonce" content="${attr(o.nonce)}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>qpoint bias panel</title>
</head>
<body>
<div id="qpoint-caution" class="caution" role="note">${text(CAUTION)}</div>
<main id="qpoint-root"></main>
<div id="qpoint-status" class="visually-hidden" role="status"></div>
<script nonce="${attr(o.nonce)}" src="${attr(o.scriptUri)}"></script>
</body>
</html>
`;
}

function text(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

function attr(s: string): string {
  return text(s).replace(/"/g, '&quot;');
}
