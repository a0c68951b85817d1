export { ModelEditor, type ModelEditorProps } from './components/model-editor';
export { modelExtensions, type ModelExtensionOptions, type ModelCompartments } from './extensions';
export { modelLanguage, modelHighlighter, modelHighlighting, densityTag, mathFunctionTag, comparisonTag } from './language';
export { modelCompletionSource, declaredNames, type DeclaredName } from './completion';
export { modelLinter, messagesToDiagnostics, suggestedFix, suggestedName } from './lint';
export { schemaFacet } from './schema';
export { modelTheme } from './theme';
export { modelHover, hoverInfo, type HoverInfo } from './hover';
