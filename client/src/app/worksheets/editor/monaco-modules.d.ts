// The ESM entry points of monaco-editor that the code editor loads; they ship without their own
// declarations, so they are typed here by the editor API they export.
declare module 'monaco-editor/esm/vs/editor/edcore.main.js' {
  export * from 'monaco-editor/esm/vs/editor/editor.api.js';
}
declare module 'monaco-editor/esm/vs/basic-languages/markdown/markdown.contribution.js';
declare module 'monaco-editor/esm/vs/editor/editor.worker.start.js';
