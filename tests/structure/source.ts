// The kernel's and the front ends' TypeScript sources, read with the TypeScript compiler API, for
// the structure tests: every module's imports, and the extent of every function and class.
import { readdirSync, readFileSync } from 'node:fs'
import { dirname, join, normalize, relative } from 'node:path'
import ts from 'typescript'

/** The repository root (this file is tests/structure/source.ts). */
export const ROOT = normalize(join(dirname(new URL(import.meta.url).pathname), '..', '..'))

/** Every .ts file under `dir` (repository-relative, forward slashes), sorted. */
export function sourceFiles(dir: string): string[] {
  const out: string[] = []
  const walk = (d: string) => {
    for (const e of readdirSync(join(ROOT, d), { withFileTypes: true })) {
      const p = `${d}/${e.name}`
      if (e.isDirectory()) walk(p)
      else if (e.name.endsWith('.ts') && !e.name.endsWith('.d.ts')) out.push(p)
    }
  }
  walk(dir)
  return out.sort()
}

/** The parsed source file at a repository-relative path. */
export function parse(file: string): ts.SourceFile {
  return ts.createSourceFile(file, readFileSync(join(ROOT, file), 'utf8'), ts.ScriptTarget.Latest, true)
}

/** One import (or re-export) of a module: the repository-relative file it names, and whether only types cross. */
export interface ImportEdge { from: string; to: string; typeOnly: boolean; line: number }

/** Resolves a relative specifier written in `from` to a repository-relative path (`.ts` added when the file exists). */
function resolve(from: string, spec: string, known: Set<string>): string {
  const base = normalize(join(dirname(from), spec.replace(/\?.*$/, ''))).split('\\').join('/')
  for (const candidate of [base, `${base}.ts`, base.replace(/\.js$/, '.ts'), `${base}/index.ts`]) if (known.has(candidate)) return candidate
  return base
}

/**
 * The relative imports of `file`: static imports, re-exports and dynamic `import('...')` calls.
 * Bare specifiers (packages) are left out.
 */
export function importsOf(file: string, known: Set<string>): ImportEdge[] {
  const sf = parse(file)
  const out: ImportEdge[] = []
  const add = (spec: string, typeOnly: boolean, node: ts.Node) => {
    if (!spec.startsWith('.')) return
    out.push({ from: file, to: resolve(file, spec, known), typeOnly, line: sf.getLineAndCharacterOfPosition(node.getStart()).line + 1 })
  }
  const visit = (node: ts.Node) => {
    if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
      const c = node.importClause
      const typeOnly = !!c && (c.isTypeOnly || (!c.name && !!c.namedBindings && ts.isNamedImports(c.namedBindings) && c.namedBindings.elements.length > 0 && c.namedBindings.elements.every((e) => e.isTypeOnly)))
      add(node.moduleSpecifier.text, typeOnly, node)
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
      const typeOnly = node.isTypeOnly || (!!node.exportClause && ts.isNamedExports(node.exportClause) && node.exportClause.elements.every((e) => e.isTypeOnly))
      add(node.moduleSpecifier.text, typeOnly, node)
    } else if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword && node.arguments.length === 1 && ts.isStringLiteral(node.arguments[0])) {
      add(node.arguments[0].text, false, node)
    } else if (ts.isImportTypeNode(node) && ts.isLiteralTypeNode(node.argument) && ts.isStringLiteral(node.argument.literal)) {
      add(node.argument.literal.text, true, node)
    }
    ts.forEachChild(node, visit)
  }
  visit(sf)
  return out
}

/** A function or class and the number of lines it spans (first line to last, inclusive). */
export interface Extent { file: string; name: string; kind: 'function' | 'class'; line: number; lines: number }

function nameOf(node: ts.Node, sf: ts.SourceFile): string {
  const named = node as ts.Node & { name?: ts.Node }
  if (named.name && (ts.isIdentifier(named.name) || ts.isStringLiteral(named.name) || ts.isPrivateIdentifier(named.name))) return named.name.text
  const parent = node.parent
  if (parent && ts.isVariableDeclaration(parent) && ts.isIdentifier(parent.name)) return parent.name.text
  if (parent && ts.isPropertyAssignment(parent)) return parent.name.getText(sf)
  if (parent && ts.isPropertyDeclaration(parent)) return parent.name.getText(sf)
  return `(anonymous at line ${sf.getLineAndCharacterOfPosition(node.getStart()).line + 1})`
}

/** Every function (declarations, methods, accessors, constructors, arrow and function expressions) and class in `file`. */
export function extentsOf(file: string): Extent[] {
  const sf = parse(file)
  const out: Extent[] = []
  const visit = (node: ts.Node) => {
    const isFunction = ts.isFunctionDeclaration(node) || ts.isMethodDeclaration(node) || ts.isConstructorDeclaration(node) ||
      ts.isGetAccessorDeclaration(node) || ts.isSetAccessorDeclaration(node) || ts.isArrowFunction(node) || ts.isFunctionExpression(node)
    const isClass = ts.isClassDeclaration(node) || ts.isClassExpression(node)
    if ((isFunction && (node as ts.FunctionLikeDeclaration).body) || isClass) {
      const first = sf.getLineAndCharacterOfPosition(node.getStart()).line
      const last = sf.getLineAndCharacterOfPosition(node.getEnd()).line
      out.push({ file, name: nameOf(node, sf), kind: isClass ? 'class' : 'function', line: first + 1, lines: last - first + 1 })
    }
    ts.forEachChild(node, visit)
  }
  visit(sf)
  return out
}
