// Entry point of the browser workbench: styles, the guide notebook as the first-visit text, the
// store, and the page.
import 'katex/dist/katex.min.css'
import './style.css'
import guide from '../../notebooks/guide.md?raw'
import { DIAGRAM_CSS } from './diagram'
import { Shelf, openStore } from './store'
import { Workbench } from './workbench'

// Sanitizing drops <style> inside diagrams, so the diagram's styles live in the page once.
const diagramStyle = document.createElement('style')
diagramStyle.textContent = DIAGRAM_CSS
document.head.append(diagramStyle)

const root = document.getElementById('app')!
const bench = new Workbench(root, new Shelf(openStore()), guide)
void bench.start()
