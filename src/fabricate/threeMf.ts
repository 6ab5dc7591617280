// 3MF package (3MF Consortium, "3D Manufacturing Format Core Specification" 1.x): an OPC zip with
// [Content_Types].xml, _rels/.rels and 3D/3dmodel.model, unit millimeter. Each body is a named mesh <object>;
// one more object holds them all as <components> and is the only build <item>, so a slicer moves, arranges or
// drops the interlocked rings as a whole and cannot pull them apart.
import { strToU8, zipSync } from 'fflate';
import type { MeshBody } from './torusMesh.js';

export const CORE_NAMESPACE = 'http://schemas.microsoft.com/3dmanufacturing/core/2015/02';
const MODEL_REL_TYPE = 'http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel';
const DECIMALS = 6;

export function encode3mf(bodies: readonly MeshBody[], name = 'thickring assembly'): Uint8Array {
  const contentTypes =
    '<?xml version="1.0" encoding="UTF-8"?>\n' +
    '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">\n' +
    ' <Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>\n' +
    ' <Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/>\n' +
    '</Types>\n';
  const rels =
    '<?xml version="1.0" encoding="UTF-8"?>\n' +
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">\n' +
    ` <Relationship Target="/3D/3dmodel.model" Id="rel0" Type="${MODEL_REL_TYPE}"/>\n` +
    '</Relationships>\n';
  return zipSync({
    '[Content_Types].xml': strToU8(contentTypes),
    '_rels/.rels': strToU8(rels),
    '3D/3dmodel.model': strToU8(modelXml(bodies, name)),
  });
}

export function modelXml(bodies: readonly MeshBody[], name = 'thickring assembly'): string {
  const parts: string[] = [
    '<?xml version="1.0" encoding="UTF-8"?>\n',
    `<model unit="millimeter" xml:lang="en-US" xmlns="${CORE_NAMESPACE}">\n`,
    ' <metadata name="Application">thickring</metadata>\n',
    ' <resources>\n',
  ];
  bodies.forEach((b, n) => {
    parts.push(`  <object id="${n + 1}" name="${escapeXml(b.name)}" type="model">\n   <mesh>\n    <vertices>\n`);
    const p = b.positions;
    for (let i = 0; i < p.length; i += 3) {
      parts.push(`     <vertex x="${p[i]!.toFixed(DECIMALS)}" y="${p[i + 1]!.toFixed(DECIMALS)}" z="${p[i + 2]!.toFixed(DECIMALS)}"/>\n`);
    }
    parts.push('    </vertices>\n    <triangles>\n');
    const t = b.triangles;
    for (let f = 0; f < t.length; f += 3) parts.push(`     <triangle v1="${t[f]}" v2="${t[f + 1]}" v3="${t[f + 2]}"/>\n`);
    parts.push('    </triangles>\n   </mesh>\n  </object>\n');
  });
  // The spec asks for referenced objects to be defined before the object that uses them.
  const assembly = bodies.length + 1;
  parts.push(`  <object id="${assembly}" name="${escapeXml(name)}" type="model">\n   <components>\n`);
  bodies.forEach((_b, n) => parts.push(`    <component objectid="${n + 1}"/>\n`));
  parts.push('   </components>\n  </object>\n');
  parts.push(' </resources>\n <build>\n');
  parts.push(`  <item objectid="${assembly}"/>\n`);
  parts.push(' </build>\n</model>\n');
  return parts.join('');
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}
