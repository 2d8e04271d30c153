import { describe, expect, it } from 'vitest'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'

/**
 * The built client must work offline. Any http(s) URL of another host left in the bundle must be
 * inert text (an XML namespace, a licence comment or a default of a plot feature we never use);
 * the browser tests separately fail on any request that leaves the local server.
 */
const INERT_HOSTS: Record<string, string> = {
  'www.w3.org': 'XML/SVG namespace identifiers',
  'www.ivoa.net': 'VOTable namespace identifier',
  'json-schema.org': 'the $schema identifier zod writes into JSON Schema (a name, never fetched)',
  'vuejs.org': 'link text in Vue error messages',
}
describe('built client', () => {
  it('names no external host except inert identifiers (plotly defaults are listed with the reason)', () => {
    const dir = join(PROJECT_ROOT, 'dist', 'assets')
    const hosts = new Map<string, number>()
    for (const f of readdirSync(dir)) {
      if (!/\.(js|css|html)$/.test(f)) continue
      for (const m of readFileSync(join(dir, f), 'utf8').matchAll(/https?:\/\/([a-z0-9.-]+\.[a-z]{2,})/gi)) {
        hosts.set(m[1].toLowerCase(), (hosts.get(m[1].toLowerCase()) ?? 0) + 1)
      }
    }
    const html = readFileSync(join(PROJECT_ROOT, 'dist', 'index.html'), 'utf8')
    expect(html).not.toMatch(/<(script|link)[^>]+(src|href)="https?:/)
    const unexpected = [...hosts.keys()].filter((h) => !INERT_HOSTS[h] && !PLOTLY_BUNDLED_DEFAULTS.has(h))
    expect(unexpected).toEqual([])
  })
})

/**
 * Host names that can stand inside a plotly bundle: documentation links in error messages, map tile
 * and topojson defaults for geo/map traces (not in the SVG-only bundle we ship), and MathJax.
 */
const PLOTLY_BUNDLED_DEFAULTS = new Set([
  'plot.ly', 'cdn.plot.ly', 'plotly.com', 'api.mapbox.com', 'www.mapbox.com', 'github.com', 'openstreetmap.org', 'www.openstreetmap.org',
  'basemaps.cartocdn.com', 'tile.openstreetmap.org', 'stamen-tiles.a.ssl.fastly.net', 'tiles.stadiamaps.com', 'stadiamaps.com',
  'carto.com', 'maps.wikimedia.org', 'basemap.nationalmap.gov', 'server.arcgisonline.com', 'services.arcgisonline.com',
  'www.esri.com', 'a.tile.openstreetmap.org', 'mathjax.org', 'www.mathjax.org', 'docs.mapbox.com', 'demotiles.maplibre.org',
  'maplibre.org', 'vectortileservices3.arcgis.com', 'earthquake.usgs.gov', 'fonts.openmaptiles.org',
  'geoserveis.icgc.cat', 'tilemaps.icgc.cat', 'wiki.openstreetmap.org', 'tiles.basemaps.cartocdn.com', 'maplibre.invalid',
  'cloud.plotly.com', 'cdn.jsdelivr.net', 'get.webgl.org',
])
