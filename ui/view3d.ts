// The 3D view of the page: tubes (solid or see-through), core circles and struts coloured by force,
// with orbit/pan/zoom (OrbitControls) and a move/turn handle on the selected ring (TransformControls).
// Rendering is on demand (after a change or a control event), so an idle page costs nothing.
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import { TransformControls } from 'three/examples/jsm/controls/TransformControls.js';
import type { Ring, Vec3 } from '../src/model/types.js';

export interface ViewStrut {
  onA: Vec3;
  onB: Vec3;
  /** Normalised force in [0, 1] (largest strut = 1); null when not computed (drawn grey). */
  force: number | null;
}

export interface ViewCallbacks {
  /** The handle moved ring `index` to this pose (called on every drag step). */
  onDrag(index: number, center: Vec3, normal: Vec3): void;
  /** The drag ended. */
  onDragEnd(index: number): void;
}

const RING_COLORS = [0x2f6fbf, 0xd9822b, 0x3a9a5b, 0x9b4dca, 0xc2474a, 0x2aa1a8, 0x8c6d31, 0x5a5a9e];
const BAD_COLOR = 0xe02424;
const UNKNOWN_FORCE_COLOR = 0x707070;
/** Facets of a tube: fewer around the tube than along the ring, enough to read the contacts. */
const TUBULAR = 96;
const RADIAL = 24;

/** Force colour: pale yellow (weak) to dark red (strongest); grey when the force is unknown. */
export function forceColor(f: number | null): THREE.Color {
  if (f === null) return new THREE.Color(UNKNOWN_FORCE_COLOR);
  const t = Math.max(0, Math.min(1, f));
  return new THREE.Color().setHSL(0.14 - 0.14 * t, 0.9, 0.7 - 0.35 * t);
}

export class View3d {
  readonly renderer: THREE.WebGLRenderer;
  private readonly scene = new THREE.Scene();
  private readonly camera: THREE.PerspectiveCamera;
  private readonly orbit: OrbitControls;
  private readonly handle: TransformControls;
  private readonly ringGroup = new THREE.Group();
  private readonly strutGroup = new THREE.Group();
  private objects: THREE.Object3D[] = [];
  private rings: Ring[] = [];
  private tubes: number[] = [];
  private selected = -1;
  private seeThrough = false;
  private pending = false;
  private bad = false;

  constructor(private readonly host: HTMLElement, private readonly callbacks: ViewCallbacks) {
    this.renderer = new THREE.WebGLRenderer({ antialias: true, preserveDrawingBuffer: true });
    this.renderer.setPixelRatio(Math.min(2, window.devicePixelRatio || 1));
    host.appendChild(this.renderer.domElement);
    this.renderer.domElement.setAttribute('aria-label', '3D view of the rings: drag to orbit, right-drag to pan, wheel to zoom');
    this.renderer.domElement.tabIndex = 0;
    this.scene.background = new THREE.Color(0xf7f7f4);
    this.camera = new THREE.PerspectiveCamera(40, 1, 0.01, 1000);
    this.camera.position.set(3, -4, 3);
    this.camera.up.set(0, 0, 1);
    this.scene.add(new THREE.HemisphereLight(0xffffff, 0x8a8a80, 2.2));
    const sun = new THREE.DirectionalLight(0xffffff, 1.6);
    sun.position.set(3, -2, 5);
    this.scene.add(sun, this.ringGroup, this.strutGroup);
    this.orbit = new OrbitControls(this.camera, this.renderer.domElement);
    this.orbit.addEventListener('change', () => this.requestRender());
    this.handle = new TransformControls(this.camera, this.renderer.domElement);
    this.handle.setSize(0.8);
    this.handle.addEventListener('change', () => this.requestRender());
    this.handle.addEventListener('dragging-changed', (e) => {
      this.orbit.enabled = !(e as unknown as { value: boolean }).value;
      if (!(e as unknown as { value: boolean }).value && this.selected >= 0) this.callbacks.onDragEnd(this.selected);
    });
    this.handle.addEventListener('objectChange', () => {
      const obj = this.objects[this.selected];
      if (!obj) return;
      const n = new THREE.Vector3(0, 0, 1).applyQuaternion(obj.quaternion);
      this.callbacks.onDrag(this.selected, [obj.position.x, obj.position.y, obj.position.z], [n.x, n.y, n.z]);
    });
    this.scene.add(this.handle.getHelper());
    new ResizeObserver(() => this.resize()).observe(host);
    this.resize();
  }

  /** Handle mode: 'translate' moves the ring, 'rotate' turns it. */
  setMode(mode: 'translate' | 'rotate'): void {
    this.handle.setMode(mode);
  }

  setSeeThrough(on: boolean): void {
    this.seeThrough = on;
    this.rebuild();
  }

  /** Show these rings with these tube radii (one per ring) and struts; refit the camera when asked. */
  show(rings: Ring[], tubes: number[], struts: ViewStrut[], fit: boolean): void {
    this.rings = rings.map((r) => ({ ...r, center: [...r.center] as Vec3, normal: [...r.normal] as Vec3 }));
    this.tubes = tubes.slice();
    this.expose();
    this.rebuild();
    this.setStruts(struts);
    if (fit) this.fit();
  }

  /** Grow or shrink the tubes in place (progress of a solve). */
  setTubes(tubes: number[]): void {
    this.tubes = tubes.slice();
    this.expose();
    this.rebuild();
  }

  /** Move one ring's drawing (the handle's own drags already moved it; edits from the list come here). */
  setPose(index: number, center: Vec3, normal: Vec3): void {
    this.rings[index] = { ...this.rings[index]!, center: [...center] as Vec3, normal: [...normal] as Vec3 };
    this.expose();
    const obj = this.objects[index];
    if (obj) place(obj, center, normal);
    this.requestRender();
  }

  /** Paint the selected ring red (a refused move) or its own colour. */
  setBad(bad: boolean): void {
    if (bad === this.bad) return;
    this.bad = bad;
    this.paint();
  }

  select(index: number): void {
    this.selected = index;
    const obj = this.objects[index];
    if (obj) this.handle.attach(obj);
    else this.handle.detach();
    this.paint();
  }

  /** Facet count of what is drawn (for the page's own figures). */
  triangles(): number {
    return this.renderer.info.render.triangles;
  }

  requestRender(): void {
    if (this.pending) return;
    this.pending = true;
    requestAnimationFrame(() => {
      this.pending = false;
      this.renderer.render(this.scene, this.camera);
    });
  }

  // ---- helpers -----------------------------------------------------------------------------------

  /** What is drawn, as data on the view's element (full precision: for tests and scripts driving the page). */
  private expose(): void {
    this.host.dataset['rings'] = JSON.stringify(this.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius })));
    this.host.dataset['tubes'] = JSON.stringify(this.tubes);
  }

  private rebuild(): void {
    for (const o of this.objects) dispose(o);
    this.ringGroup.clear();
    this.objects = this.rings.map((r, i) => {
      const g = new THREE.Group();
      const tube = this.tubes[i] ?? 0;
      if (tube > 0) {
        const mat = new THREE.MeshStandardMaterial({
          color: RING_COLORS[i % RING_COLORS.length]!, roughness: 0.45, metalness: 0.1,
          transparent: this.seeThrough, opacity: this.seeThrough ? 0.35 : 1, depthWrite: !this.seeThrough,
        });
        // See-through tubes show the cores and struts behind them: half the facets are plenty.
        const k = this.seeThrough ? 2 : 1;
        g.add(new THREE.Mesh(new THREE.TorusGeometry(r.radius, tube, RADIAL / k, TUBULAR / k), mat));
      }
      const pts: THREE.Vector3[] = [];
      for (let s = 0; s <= 128; s++) {
        const a = (2 * Math.PI * s) / 128;
        pts.push(new THREE.Vector3(r.radius * Math.cos(a), r.radius * Math.sin(a), 0));
      }
      g.add(new THREE.Line(new THREE.BufferGeometry().setFromPoints(pts), new THREE.LineBasicMaterial({ color: 0x222222 })));
      place(g, r.center, r.normal);
      g.userData['ring'] = i;
      this.ringGroup.add(g);
      return g;
    });
    if (this.selected >= 0 && this.objects[this.selected]) this.handle.attach(this.objects[this.selected]!);
    this.paint();
  }

  private setStruts(struts: ViewStrut[]): void {
    for (const o of [...this.strutGroup.children]) dispose(o);
    this.strutGroup.clear();
    for (const s of struts) {
      const geom = new THREE.BufferGeometry().setFromPoints([new THREE.Vector3(...s.onA), new THREE.Vector3(...s.onB)]);
      this.strutGroup.add(new THREE.Line(geom, new THREE.LineBasicMaterial({ color: forceColor(s.force) })));
      const dot = new THREE.Mesh(new THREE.SphereGeometry(0.02 * this.scale(), 8, 6), new THREE.MeshBasicMaterial({ color: forceColor(s.force) }));
      dot.position.set((s.onA[0] + s.onB[0]) / 2, (s.onA[1] + s.onB[1]) / 2, (s.onA[2] + s.onB[2]) / 2);
      this.strutGroup.add(dot);
    }
    this.requestRender();
  }

  private paint(): void {
    this.objects.forEach((g, i) => {
      for (const c of g.children) {
        if (c instanceof THREE.Mesh) {
          (c.material as THREE.MeshStandardMaterial).color.setHex(i === this.selected && this.bad ? BAD_COLOR : RING_COLORS[i % RING_COLORS.length]!);
          (c.material as THREE.MeshStandardMaterial).emissive.setHex(i === this.selected ? 0x202020 : 0);
        } else if (c instanceof THREE.Line) {
          (c.material as THREE.LineBasicMaterial).color.setHex(i === this.selected && this.bad ? BAD_COLOR : 0x222222);
        }
      }
    });
    this.requestRender();
  }

  private scale(): number {
    let s = 0;
    for (const r of this.rings) s = Math.max(s, Math.hypot(...r.center) + r.radius);
    return s || 1;
  }

  private fit(): void {
    const box = new THREE.Box3();
    for (const r of this.rings) {
      const c = new THREE.Vector3(...r.center);
      box.expandByPoint(c.clone().addScalar(r.radius * 1.3));
      box.expandByPoint(c.clone().addScalar(-r.radius * 1.3));
    }
    const centre = box.getCenter(new THREE.Vector3());
    const size = box.getSize(new THREE.Vector3()).length();
    this.orbit.target.copy(centre);
    // A narrow view needs the camera further back to keep the rings inside left and right.
    const back = (size * 1.15) / Math.min(1, Math.max(0.3, this.camera.aspect));
    this.camera.position.copy(centre).add(new THREE.Vector3(0.55, -0.75, 0.55).multiplyScalar(back));
    this.camera.near = size / 100;
    this.camera.far = size * 100;
    this.camera.updateProjectionMatrix();
    this.orbit.update();
    this.requestRender();
  }

  private resize(): void {
    const w = Math.max(1, this.host.clientWidth);
    const h = Math.max(1, this.host.clientHeight);
    this.renderer.setSize(w, h, false);
    this.renderer.domElement.style.width = '100%';
    this.renderer.domElement.style.height = '100%';
    this.camera.aspect = w / h;
    this.camera.updateProjectionMatrix();
    this.requestRender();
  }
}

/** Pose an object whose local z axis is the ring normal. */
function place(obj: THREE.Object3D, center: Vec3, normal: Vec3): void {
  obj.position.set(...center);
  const n = new THREE.Vector3(...normal).normalize();
  obj.quaternion.setFromUnitVectors(new THREE.Vector3(0, 0, 1), n);
}

function dispose(o: THREE.Object3D): void {
  o.traverse((c) => {
    if (c instanceof THREE.Mesh || c instanceof THREE.Line) {
      c.geometry.dispose();
      const m = c.material as THREE.Material | THREE.Material[];
      if (Array.isArray(m)) m.forEach((x) => x.dispose());
      else m.dispose();
    }
  });
}
