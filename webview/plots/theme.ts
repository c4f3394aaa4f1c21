/**
 * The colours a canvas needs, read from VS Code's theme variables on <body> (a canvas cannot use
 * CSS variables itself). Read again on every draw, since the user may switch themes while the
 * panel is open; VS Code then changes the body class and the variables.
 */
export interface PlotTheme {
  background: string;
  foreground: string;
  /** Axis labels and secondary text. */
  muted: string;
  /** Grid lines. */
  grid: string;
  /** Keyboard focus and the hovered point's ring. */
  focus: string;
  fontFamily: string;
  /** Font size in CSS pixels. */
  fontSize: number;
}

function variable(style: CSSStyleDeclaration, name: string, fallback: string): string {
  const value = style.getPropertyValue(name).trim();
  return value || fallback;
}

export function readPlotTheme(): PlotTheme {
  const body = document.body;
  const style = getComputedStyle(body);
  const dark = body.classList.contains('vscode-dark') || body.classList.contains('vscode-high-contrast');
  const highContrast = body.classList.contains('vscode-high-contrast') || body.classList.contains('vscode-high-contrast-light');
  const foreground = variable(style, '--vscode-editor-foreground', variable(style, '--vscode-foreground', dark ? '#cccccc' : '#333333'));
  return {
    background: variable(style, '--vscode-editor-background', dark ? '#1e1e1e' : '#ffffff'),
    foreground,
    muted: variable(style, '--vscode-descriptionForeground', foreground),
    grid: highContrast ? variable(style, '--vscode-contrastBorder', foreground) : dark ? 'rgba(255,255,255,0.12)' : 'rgba(0,0,0,0.10)',
    focus: variable(style, '--vscode-focusBorder', dark ? '#0078d4' : '#005fb8'),
    fontFamily: variable(style, '--vscode-font-family', 'system-ui, sans-serif'),
    fontSize: Number.parseFloat(variable(style, '--vscode-font-size', '13')) || 13,
  };
}
