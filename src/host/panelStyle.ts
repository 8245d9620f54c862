// The results panel's style sheet (no vscode import, so a unit test can lay the panel out in Chromium).
// Our own look: a quiet page with a left rule that marks the verdict, residual tints mixed from theme
// chart colours, and nothing but --vscode-* variables for colour (light, dark and high contrast alike).
export const STYLE = `
:root { color-scheme: light dark; }
body { font-family: var(--vscode-font-family); font-size: var(--vscode-font-size); color: var(--vscode-foreground); background: var(--vscode-editor-background); margin: 0; padding: 0 20px 24px; line-height: 1.45; }
#root { max-width: none; }
h1 { font-size: 1.35em; font-weight: 600; margin: 4px 0 6px; }
h2 { font-size: 1.05em; font-weight: 600; margin: 22px 0 8px; color: var(--vscode-descriptionForeground); text-transform: none; }
.headline { border-left: 4px solid var(--vscode-charts-foreground, var(--vscode-foreground)); padding: 14px 0 6px 14px; margin: 16px 0 10px; }
.headline.signal { border-left-color: var(--vscode-charts-orange, #f38518); }
.headline.quiet { border-left-color: var(--vscode-charts-blue, #3794ff); }
.eyebrow { color: var(--vscode-descriptionForeground); font-size: 0.92em; }
.key-estimate { margin: 2px 0 4px; font-variant-numeric: tabular-nums; }
.key-estimate .key-label { color: var(--vscode-descriptionForeground); }
.effect { margin: 2px 0; }
.failed-assumption { margin: 4px 0; padding: 4px 8px; border-left: 3px solid var(--vscode-editorWarning-foreground); background: var(--vscode-textBlockQuote-background); }
.apa { font-family: var(--vscode-editor-font-family); background: var(--vscode-textCodeBlock-background); padding: 4px 8px; display: inline-block; border-radius: 3px; margin: 4px 0; }
.source { color: var(--vscode-descriptionForeground); font-size: 0.9em; margin: 4px 0 0; }
.actions { display: flex; flex-wrap: wrap; gap: 6px; margin: 8px 0 14px; }
button { font: inherit; color: var(--vscode-button-secondaryForeground); background: var(--vscode-button-secondaryBackground); border: 1px solid var(--vscode-button-border, transparent); padding: 3px 10px; border-radius: 2px; cursor: pointer; }
button:hover:not([disabled]) { background: var(--vscode-button-secondaryHoverBackground); }
button:focus-visible, summary:focus-visible, .table-wrap:focus-visible { outline: 1px solid var(--vscode-focusBorder); outline-offset: 2px; }
button[disabled] { opacity: 0.5; cursor: default; }
.figures { display: grid; grid-template-columns: repeat(auto-fill, minmax(150px, 1fr)); gap: 6px 16px; margin: 6px 0 12px; }
.figures div { border-top: 1px solid var(--vscode-widget-border, var(--vscode-panel-border)); padding-top: 4px; }
.figures dt { color: var(--vscode-descriptionForeground); font-size: 0.88em; }
.figures dd { margin: 0; font-family: var(--vscode-editor-font-family); font-variant-numeric: tabular-nums; }
.has-explain { position: relative; text-decoration: underline dotted var(--vscode-descriptionForeground); text-underline-offset: 3px; cursor: help; }
li.has-explain, summary.has-explain { text-decoration: none; }
.has-explain:focus-visible { outline: 1px solid var(--vscode-focusBorder); outline-offset: 2px; }
.tip { display: none; position: absolute; z-index: 10; left: 0; top: 100%; margin-top: 4px; width: max-content; max-width: min(420px, 80vw); padding: 6px 9px; font-size: 0.92em; font-weight: normal; text-align: left; white-space: normal; line-height: 1.4; color: var(--vscode-editorHoverWidget-foreground, var(--vscode-foreground)); background: var(--vscode-editorHoverWidget-background, var(--vscode-editor-background)); border: 1px solid var(--vscode-editorHoverWidget-border, var(--vscode-widget-border)); border-radius: 3px; box-shadow: 0 2px 8px var(--vscode-widget-shadow, transparent); text-decoration: none; }
.has-explain:hover > .tip, .has-explain:focus > .tip, .has-explain:focus-within > .tip { display: block; }
.has-explain.tip-left > .tip { right: 0; left: auto; }
dl.two-column { display: grid; grid-template-columns: minmax(12em, 2fr) 3fr; gap: 6px 18px; margin: 6px 0 12px; }
dl.two-column dt { color: var(--vscode-descriptionForeground); }
dl.two-column dd { margin: 0; font-variant-numeric: tabular-nums; }
dl.two-column dd .value { font-family: var(--vscode-editor-font-family); }
dl.two-column dd .note { display: block; color: var(--vscode-descriptionForeground); font-size: 0.88em; }
@media (max-width: 560px) { dl.two-column { grid-template-columns: 1fr; } }
.comparison { margin: 8px 0 14px; padding: 4px 12px; border: 1px solid var(--vscode-widget-border, var(--vscode-panel-border)); border-radius: 3px; }
.comparison.flipped { border: 2px solid var(--vscode-editorWarning-foreground); }
.comparison h2 { margin: 6px 0; }
table.compare tr.changed td:last-child { font-weight: 600; }
table.compare tr.flipped { background: color-mix(in srgb, var(--vscode-editorWarning-foreground) 22%, transparent); outline: 2px solid var(--vscode-editorWarning-foreground); }
.category-order { color: var(--vscode-descriptionForeground); font-size: 0.88em; margin: -4px 0 10px; }
.notices { list-style: none; padding: 0; margin: 8px 0; }
.notices li { padding: 3px 8px; margin: 2px 0; background: var(--vscode-textBlockQuote-background); border-left: 2px solid var(--vscode-textBlockQuote-border); }
.notices li.warning { border-left-color: var(--vscode-editorWarning-foreground); }
.table-wrap { overflow-x: auto; margin: 10px 0; }
.status { align-self: center; margin-left: 8px; color: var(--vscode-descriptionForeground); }
.status.info::before { content: '✓ '; }
.copy-table, .save-plot { font-size: 0.85em; padding: 1px 8px; margin-left: 8px; }
table.counts { border-collapse: collapse; font-variant-numeric: tabular-nums; width: 100%; }
table.counts caption { text-align: left; color: var(--vscode-descriptionForeground); padding-bottom: 4px; }
table.counts th, table.counts td { padding: 3px 8px; text-align: right; border-bottom: 1px solid var(--vscode-widget-border, var(--vscode-panel-border)); }
table.counts td { white-space: nowrap; }
table.counts thead th { overflow-wrap: anywhere; }
table.counts th.label { text-align: left; }
table.counts thead th { font-weight: 600; border-bottom: 2px solid var(--vscode-foreground); }
.tint-above { background: color-mix(in srgb, var(--vscode-charts-orange, #f38518) var(--tint), transparent); }
.tint-below { background: color-mix(in srgb, var(--vscode-charts-blue, #3794ff) var(--tint), transparent); }
.band-3, .band-2 { font-weight: 600; }
.sign { color: var(--vscode-descriptionForeground); font-size: 0.85em; }
.plots { display: grid; grid-template-columns: repeat(auto-fit, minmax(min(100%, 520px), 1fr)); gap: 10px 24px; }
figure.plot { margin: 8px 0; }
figure.plot svg { display: block; width: 100%; max-width: 720px; height: auto; }
figcaption { color: var(--vscode-descriptionForeground); font-size: 0.9em; }
svg text { fill: var(--vscode-foreground); font-family: var(--vscode-font-family); }
svg .tick { font-size: 11px; fill: var(--vscode-descriptionForeground); }
svg .label { font-size: 12px; }
svg .axis, svg .grid { stroke: var(--vscode-charts-lines, var(--vscode-foreground)); stroke-width: 1; }
svg .grid { stroke-opacity: 0.35; }
svg .curve { fill: none; stroke: var(--vscode-charts-foreground, var(--vscode-foreground)); stroke-width: 1.8; }
svg .tail { fill: var(--vscode-charts-orange, #f38518); fill-opacity: 0.55; stroke: var(--vscode-charts-orange, #f38518); stroke-width: 1; }
svg .tail-hatch { display: none; }
svg .hatch-line { stroke: var(--vscode-foreground); stroke-width: 1.4; }
body.vscode-high-contrast svg .tail, body.vscode-high-contrast-light svg .tail { fill: none; stroke: var(--vscode-contrastBorder, var(--vscode-foreground)); stroke-width: 1.5; }
body.vscode-high-contrast svg .tail-hatch, body.vscode-high-contrast-light svg .tail-hatch { display: inline; }
svg .critical { stroke: var(--vscode-descriptionForeground); stroke-dasharray: 4 3; fill: none; }
svg .observed { stroke: var(--vscode-charts-red); stroke-width: 2; }
svg .marker-label { font-size: 12px; font-weight: 600; }
svg .band { fill: var(--vscode-descriptionForeground); fill-opacity: 0.18; }
svg .zero { stroke: var(--vscode-foreground); stroke-width: 1.4; }
svg .stem { stroke-width: 3; }
svg .above { stroke: var(--vscode-charts-orange, #f38518); fill: var(--vscode-charts-orange, #f38518); }
svg .below { stroke: var(--vscode-charts-blue, #3794ff); fill: var(--vscode-charts-blue, #3794ff); }
svg .none { stroke: var(--vscode-descriptionForeground); fill: var(--vscode-descriptionForeground); }
svg .strong { font-weight: 700; }
svg .cell { stroke: var(--vscode-widget-border, var(--vscode-panel-border)); fill: transparent; }
svg .cell.tint-above { fill: var(--vscode-charts-orange, #f38518); }
svg .cell.tint-below { fill: var(--vscode-charts-blue, #3794ff); }
svg .cell-label { font-size: 12px; }
svg .interval { stroke: var(--vscode-charts-blue, #3794ff); stroke-width: 3; fill: var(--vscode-charts-blue, #3794ff); }
svg .estimate { fill: var(--vscode-charts-blue, #3794ff); }
svg .reference { stroke: var(--vscode-charts-red); stroke-width: 2; stroke-dasharray: 5 3; }
svg .power { fill: none; stroke: var(--vscode-charts-blue, #3794ff); stroke-width: 2; }
svg .marker { fill: var(--vscode-charts-red); }
.assumption { margin: 4px 0; border: 1px solid var(--vscode-widget-border, var(--vscode-panel-border)); border-radius: 3px; padding: 4px 10px; }
.assumption summary { cursor: pointer; }
.assumption .state { color: var(--vscode-descriptionForeground); }
.assumption.met .codicon { color: var(--vscode-testing-iconPassed, var(--vscode-charts-green)); }
.assumption.failed .codicon { color: var(--vscode-testing-iconFailed, var(--vscode-charts-red)); }
.assumption.unchecked .codicon { color: var(--vscode-descriptionForeground); }
.alternative { font-style: italic; }
.caution { margin-top: 22px; padding-top: 8px; border-top: 1px solid var(--vscode-widget-border, var(--vscode-panel-border)); color: var(--vscode-descriptionForeground); font-size: 0.9em; }
.status.error { color: var(--vscode-errorForeground); }
[aria-busy="true"] { opacity: 0.6; }
`;
