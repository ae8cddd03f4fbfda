// CodeMirror 6 editors for the formal blocks. They highlight with the kernel's own Lezer parser
// (one grammar for both, so they never disagree), number lines as notebook lines (diagnostics and
// reasons speak in notebook lines), and show the kernel's diagnostics as lint when the page pushes
// them: the editors never ask the kernel themselves.
import { defaultKeymap, history, historyKeymap, indentWithTab } from '@codemirror/commands'
import { HighlightStyle, LRLanguage, bracketMatching, indentOnInput, syntaxHighlighting } from '@codemirror/language'
import { setDiagnostics, type Diagnostic as LintDiagnostic } from '@codemirror/lint'
import { Compartment, EditorState, type Extension } from '@codemirror/state'
import { EditorView, drawSelection, highlightActiveLine, keymap, lineNumbers } from '@codemirror/view'
import { styleTags, tags as t } from '@lezer/highlight'
import { parser } from '../../kernels/language/parser.js'

/** The twofold language for CodeMirror, highlighted through the kernel's grammar. */
export const twofoldLanguage = LRLanguage.define({
  name: 'twofold',
  parser: parser.configure({
    props: [
      styleTags({
        'protocol property check const timing faults message state on from step': t.definitionKeyword,
        // The check-line words are contextual keywords: these names match only where the grammar
        // read them as keywords, so a variable called `at` or `limit` is not coloured.
        'if then else for broadcast send to skip one of at with in within states by induction': t.keyword,
        'peer any': t.modifier,
        'synchronous asynchronous none crash bool': t.atom,
        'TimingKind/eventually': t.atom,
        'always eventually next until unless forall': t.controlKeyword,
        'not and or implies iff count some every pending': t.operatorKeyword,
        Boolean: t.bool,
        Number: t.number,
        SignedNumber: t.number,
        ProcNumber: t.special(t.variableName),
        LineComment: t.lineComment,
        'ProtocolDecl/Identifier PropertyDecl/Identifier': t.definition(t.name),
        'StateDecl/Identifier ConstDecl/Identifier MessageDecl/Identifier FieldDecl/Identifier': t.definition(t.variableName),
        'Member/Identifier': t.propertyName,
        'CallExpression/Identifier': t.function(t.variableName),
        CompareOp: t.compareOperator,
        '":="': t.definitionOperator,
        '"+" "-" "*" "/" "%"': t.arithmeticOperator,
        '"->" ".."': t.punctuation,
        '( )': t.paren,
        '{ }': t.brace,
        '[ ]': t.squareBracket,
      }),
    ],
  }),
  languageData: { commentTokens: { line: '//' } },
})

/** Our colours: ink on paper, keywords in a deep green, temporal operators in plum. */
const highlight = HighlightStyle.define([
  { tag: t.definitionKeyword, color: '#2f5d50', fontWeight: '600' },
  { tag: t.keyword, color: '#2f5d50' },
  { tag: t.controlKeyword, color: '#7a3f7c', fontWeight: '600' },
  { tag: t.operatorKeyword, color: '#7a3f7c' },
  { tag: [t.atom, t.bool, t.modifier], color: '#8a5a1e' },
  { tag: t.number, color: '#8a5a1e' },
  { tag: t.special(t.variableName), color: '#8a5a1e' },
  { tag: t.lineComment, color: '#8b877c', fontStyle: 'italic' },
  { tag: t.definition(t.name), color: '#1f1f1d', fontWeight: '700' },
  { tag: t.definition(t.variableName), color: '#1f1f1d', textDecoration: 'underline 1px #c9c3b3' },
  { tag: t.propertyName, color: '#3b4f78' },
])

const theme = EditorView.theme({
  '&': { fontSize: '14px', backgroundColor: 'transparent' },
  '.cm-content': { fontFamily: '"IBM Plex Mono", "DejaVu Sans Mono", Menlo, monospace', padding: '6px 0' },
  '.cm-gutters': { backgroundColor: 'transparent', border: 'none', color: '#a9a496' },
  '.cm-activeLine': { backgroundColor: 'transparent' },
  '&.cm-focused .cm-activeLine': { backgroundColor: '#f4efe0' },
  '&.cm-focused': { outline: 'none' },
  '.cm-lineNumbers .cm-gutterElement': { minWidth: '3ch', paddingRight: '10px', fontSize: '12px' },
})

/** A diagnostic in notebook offsets, as the kernel reports it. */
export interface NotebookDiagnostic { from: number; to: number; severity: 'error' | 'warning'; message: string }

/** What an editor needs from the page. */
export interface EditorHooks {
  /** Called with the block's new content after every change. */
  onChange(content: string): void
  /** The notebook line of the block's first content line (changes as text above it changes). */
  firstLine(): number
  /** An accessible name for the editor, such as "protocol block pumps". */
  label: string
  /** Extra key bindings (the check editor binds its run command). */
  keys?: { key: string; run: () => boolean }[]
}

/** A formal-block editor and the handles the page uses on it. */
export class BlockEditor {
  readonly view: EditorView
  private numbers = new Compartment()

  constructor(parent: HTMLElement, content: string, private hooks: EditorHooks) {
    const extensions: Extension[] = [
      this.numbers.of(this.lineNumbering()),
      history(),
      drawSelection(),
      highlightActiveLine(),
      indentOnInput(),
      bracketMatching(),
      twofoldLanguage,
      syntaxHighlighting(highlight),
      theme,
      EditorView.lineWrapping,
      keymap.of([...(hooks.keys ?? []), indentWithTab, ...defaultKeymap, ...historyKeymap]),
      EditorView.contentAttributes.of({ 'aria-label': hooks.label }),
      EditorView.updateListener.of((u) => { if (u.docChanged) hooks.onChange(u.state.doc.toString()) }),
    ]
    this.view = new EditorView({ state: EditorState.create({ doc: content, extensions }), parent })
  }

  private lineNumbering(): Extension {
    const base = this.hooks.firstLine()
    return lineNumbers({ formatNumber: (n) => String(n + base - 1) })
  }

  /** Re-reads the block's first notebook line (after edits above it moved the block). */
  renumber(): void {
    this.view.dispatch({ effects: this.numbers.reconfigure(this.lineNumbering()) })
  }

  /** Shows diagnostics; `offset` is the notebook offset of the block's first content character. */
  showDiagnostics(diagnostics: NotebookDiagnostic[], offset: number): void {
    const len = this.view.state.doc.length
    const lint: LintDiagnostic[] = diagnostics.map((d) => {
      const from = Math.min(Math.max(d.from - offset, 0), len)
      return { from, to: Math.min(Math.max(d.to - offset, from), len), severity: d.severity, message: d.message, source: 'twofold' }
    })
    this.view.dispatch(setDiagnostics(this.view.state, lint))
  }

  /** Puts the cursor at a content offset and brings it into view. */
  jumpTo(offset: number): void {
    const pos = Math.min(Math.max(offset, 0), this.view.state.doc.length)
    this.view.dispatch({ selection: { anchor: pos }, scrollIntoView: true })
    this.view.focus()
  }

  destroy(): void { this.view.destroy() }
}
