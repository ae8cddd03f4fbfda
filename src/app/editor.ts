// CodeMirror 6 editors for the formal blocks. They highlight with the kernel's own Lezer parser
// (one grammar for both, so they never disagree), number lines as notebook lines (diagnostics and
// reasons speak in notebook lines), and show the kernel's diagnostics as lint when the page pushes
// them: the editors never ask the kernel themselves.
import { defaultKeymap, history, historyKeymap, indentLess, indentMore } from '@codemirror/commands'
import { HighlightStyle, LRLanguage, bracketMatching, indentOnInput, indentService, indentUnit, syntaxHighlighting } from '@codemirror/language'
import { highlightSelectionMatches, search, searchKeymap } from '@codemirror/search'
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
  // A line that is only a closing brace is re-indented as it is typed (indentOnInput), so it dedents.
  languageData: { commentTokens: { line: '//' }, indentOnInput: /^\s*[}\]]$/ },
})

/** The height of the page's sticky header, which covers the top of the viewport. */
function headerHeight(): number {
  return document.querySelector('.topbar')?.getBoundingClientRect().height ?? 0
}

/** Our colours: ink on paper, keywords in a deep green, temporal operators in plum. */
const highlight = HighlightStyle.define([
  { tag: t.definitionKeyword, color: 'var(--green)', fontWeight: '600' },
  { tag: t.keyword, color: 'var(--green)' },
  { tag: t.controlKeyword, color: 'var(--plum)', fontWeight: '600' },
  { tag: t.operatorKeyword, color: 'var(--plum)' },
  { tag: [t.atom, t.bool, t.modifier], color: 'var(--ochre)' },
  { tag: t.number, color: 'var(--ochre)' },
  { tag: t.special(t.variableName), color: 'var(--ochre)' },
  { tag: t.lineComment, color: 'var(--ink-3)', fontStyle: 'italic' },
  { tag: t.definition(t.name), color: 'var(--ink)', fontWeight: '700' },
  { tag: t.definition(t.variableName), color: 'var(--ink)', textDecoration: 'underline 1px var(--rule)' },
  { tag: t.propertyName, color: 'var(--navy)' },
])

const theme = EditorView.theme({
  '&': { fontSize: '14px', backgroundColor: 'transparent' },
  '.cm-content': { fontFamily: '"IBM Plex Mono", "DejaVu Sans Mono", Menlo, monospace', padding: '6px 0', caretColor: 'var(--ink)' },
  '.cm-gutters': { backgroundColor: 'transparent', border: 'none', color: 'var(--ink-3)' },
  '.cm-activeLine': { backgroundColor: 'transparent' },
  '&.cm-focused .cm-activeLine': { backgroundColor: 'var(--paper-2)' },
  '&.cm-focused': { outline: 'none' },
  '.cm-cursor': { borderLeftColor: 'var(--ink)' },
  '.cm-panels': { backgroundColor: 'var(--paper-2)', color: 'var(--ink)' },
  '.cm-textfield': { backgroundColor: 'var(--card)', color: 'var(--ink)', border: '1px solid var(--rule)' },
  '.cm-button': { backgroundImage: 'none', backgroundColor: 'var(--paper-2)', color: 'var(--ink)' },
  '.cm-searchMatch': { backgroundColor: 'var(--lit)' },
  '.cm-lineNumbers .cm-gutterElement': { minWidth: '3ch', paddingRight: '10px', fontSize: '12px' },
})

/**
 * Indentation by braces: a line is indented one unit deeper than the line above when that line
 * opens a brace, and a line that starts with a closing brace dedents. Simple and predictable.
 */
const braceIndent = indentService.of((context, pos) => {
  // The line being indented (after a simulated break, the part after it), and the line above it.
  const line = context.lineAt(pos, 1)
  if (line.from === 0) return 0
  const above = context.lineAt(line.from - 1, -1)
  const base = /^\s*/.exec(above.text)![0].replace(/\t/g, '  ').length
  const opens = (above.text.replace(/\/\/.*$/, '').match(/[{[(]/g) ?? []).length - (above.text.replace(/\/\/.*$/, '').match(/[}\])]/g) ?? []).length
  const here = context.textAfterPos(pos)
  const closes = /^\s*[}\])]/.test(here) ? 1 : 0
  return Math.max(0, base + context.unit * (Math.max(0, opens) - closes))
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
      indentUnit.of('  '),
      braceIndent,
      search({ top: true }),
      highlightSelectionMatches(),
      // No Tab binding: Tab moves focus through the page. Indenting is Enter, a typed `}`, Mod-] and Mod-[.
      keymap.of([...(hooks.keys ?? []), { key: 'Mod-]', run: indentMore }, { key: 'Mod-[', run: indentLess }, ...searchKeymap, ...defaultKeymap, ...historyKeymap]),
      EditorView.scrollMargins.of(() => ({ top: headerHeight() + 12, bottom: 24 })),
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

  /** Puts the cursor at a content offset and brings it into view below the sticky header. */
  jumpTo(offset: number, scroll = true): void {
    const pos = Math.min(Math.max(offset, 0), this.view.state.doc.length)
    this.view.dispatch({ selection: { anchor: pos }, effects: scroll ? EditorView.scrollIntoView(pos, { y: 'center' }) : [] })
    this.view.focus()
  }

  destroy(): void { this.view.destroy() }
}
