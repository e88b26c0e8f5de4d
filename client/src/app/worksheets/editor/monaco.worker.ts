// Monaco's editor worker (diffs, word ranges), bundled by the build and served from our origin.
import 'monaco-editor/esm/vs/editor/editor.worker.js';
