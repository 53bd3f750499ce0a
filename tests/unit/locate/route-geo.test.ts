import { describe, expect, it } from 'vitest';
import { routePosition } from '../../../shared/field/route-position';
import { geoUri, locationGeoJson, locationGpx } from '../../../shared/locate/geo-files';
import {
  coordinateProblems,
  groundDistanceM,
  placeOnGround,
  pointAtChainage,
  pointBetween,
  type MarkerOnMap,
} from '../../../shared/locate/route-geo';

/** Metres per degree along a meridian on the mean sphere: 6 371 008.8 m × π/180 = 111 194.93 m (hand-worked). */
const M_PER_DEGREE = 111_194.93;

/**
 * A 500 m run of invented test coordinates laid along a meridian, so every
 * position can be worked out by hand: MH-1 at chainage 100 m (4 m of slack
 * coiled), MH-2 at 300 m, 0.0018° further south (0.0018 × 111 194.93 = 200.15 m
 * in a straight line, for 200 m along the route).
 */
const markers: Array<MarkerOnMap & { kind: 'manhole'; slackM: number }> = [
  { label: 'MH-1', kind: 'manhole', chainageM: 100, slackM: 4, latitude: -30, longitude: -15 },
  { label: 'MH-2', kind: 'manhole', chainageM: 300, slackM: 0, latitude: -30.0018, longitude: -15 },
];
const run = { installedLengthM: 504, endALabel: 'Kiosk K-1', endBLabel: 'Pole 22', markers };

describe('ground distances and points between coordinates', () => {
  it('measures 0.01° of a meridian as 1111.95 m', () => {
    // R1 × 0.01 × π/180 = 6 371 008.8 × 1.745329e-4 = 1111.951 m (hand-worked).
    expect(groundDistanceM({ latitude: 10, longitude: 20 }, { latitude: 10.01, longitude: 20 })).toBeCloseTo(1111.951, 2);
    // Along the equator the same angle is the same length.
    expect(groundDistanceM({ latitude: 0, longitude: 10 }, { latitude: 0, longitude: 10.01 })).toBeCloseTo(1111.951, 2);
  });

  it('puts a point on the great circle, not on the straight line in degrees', () => {
    // Along a meridian or the equator the great circle is linear in the angle (hand-worked).
    expect(pointBetween({ latitude: 0, longitude: 10 }, { latitude: 0, longitude: 10.002 }, 0.5)).toEqual({
      latitude: expect.closeTo(0, 12),
      longitude: expect.closeTo(10.001, 12),
    });
    // Between two points on the 45° parallel, 0.01° of longitude apart, the great circle's midpoint lies at
    // atan(tan 45° / cos 0.005°) = 45° + 1.09e-7° (spherical right triangle, Napier's rules; hand-worked).
    const mid = pointBetween({ latitude: 45, longitude: 0 }, { latitude: 45, longitude: 0.01 }, 0.5);
    expect(mid.longitude).toBeCloseTo(0.005, 12);
    expect(mid.latitude - 45).toBeCloseTo(1.09e-7, 9);
  });
});

describe('interpolating a place on the route between markers with coordinates', () => {
  it('places a chainage by its fraction of the way between two markers', () => {
    // Chainage 150 m is 50/200 = 0.25 of the way from MH-1 to MH-2: −30 − 0.25 × 0.0018 = −30.00045° (hand-worked).
    const p = pointAtChainage(markers, 150)!;
    expect(p.latitude).toBeCloseTo(-30.00045, 9);
    expect(p.longitude).toBeCloseTo(-15, 9);
    expect([p.fromLabel, p.toLabel]).toEqual(['MH-1', 'MH-2']);
    // At a marker, its own coordinate; outside the stretch the markers span, nothing.
    expect(pointAtChainage(markers, 300)).toMatchObject({ latitude: -30.0018, fromLabel: 'MH-2', toLabel: 'MH-2' });
    expect(pointAtChainage(markers, 99)).toBeNull();
    expect(pointAtChainage(markers, 301)).toBeNull();
    expect(pointAtChainage([{ label: 'X', chainageM: 10, latitude: null, longitude: null }], 10)).toBeNull();
  });

  it('takes the slack coiled at a marker off before placing a fault and its window', () => {
    // 254 m of cable from A passes MH-1's 4 m coil: chainage 250 m, 150/200 = 0.75 of the way to MH-2,
    // latitude −30 − 0.75 × 0.0018 = −30.00135°. The window 244–264 m of cable is chainage 240–260 m:
    // −30.00126° … −30.00144° (hand-worked).
    const pos = routePosition(run, 'A', 254, { startM: 244, endM: 264 });
    expect(pos.chainageM).toBeCloseTo(250, 9);
    const place = placeOnGround(markers, pos)!;
    expect(place.point.latitude).toBeCloseTo(-30.00135, 9);
    expect(place.windowStart.latitude).toBeCloseTo(-30.00126, 9);
    expect(place.windowEnd.latitude).toBeCloseTo(-30.00144, 9);
    expect(place.windowComplete).toBe(true);
    expect(place.windowPath).toHaveLength(2);
    // The radius that holds the window: 10 m of route, which on the map is 10 × 200.15/200 = 10.0075 m.
    expect(place.radiusM).toBeCloseTo((0.00009 * M_PER_DEGREE), 2);
    expect(place.radiusM).toBeCloseTo(10.0075, 2);
  });

  it('keeps a marker inside the window on its path, and says when the window runs past the last coordinate', () => {
    // With MH-3 at chainage 400 m, 0.0009° beyond MH-2: chainage 290 m with a window 280–310 m runs over MH-2.
    // Path: 180/200 of the way from MH-1 (−30.00162°), MH-2 (−30.0018°), 10/100 of the way on to MH-3 (−30.00189°).
    const three = [...markers, { label: 'MH-3', chainageM: 400, latitude: -30.0027, longitude: -15 }];
    const inside = placeOnGround(three, { chainageM: 290, windowStartChainageM: 280, windowEndChainageM: 310 })!;
    expect(inside.windowPath.map((p) => p.latitude)).toEqual([
      expect.closeTo(-30.00162, 9),
      expect.closeTo(-30.0018, 9),
      expect.closeTo(-30.00189, 9),
    ]);
    expect(inside.windowComplete).toBe(true);
    // Without MH-3 the window stops at MH-2, the last marker with a coordinate, and says so.
    const clipped = placeOnGround(markers, { chainageM: 290, windowStartChainageM: 280, windowEndChainageM: 310 })!;
    expect(clipped.windowPath.map((p) => p.latitude)).toEqual([expect.closeTo(-30.00162, 9), expect.closeTo(-30.0018, 9)]);
    expect(clipped.windowComplete).toBe(false);
    // A point beyond the last marker with a coordinate gets no estimate at all.
    expect(placeOnGround(markers, { chainageM: 320, windowStartChainageM: 310, windowEndChainageM: 330 })).toBeNull();
  });

  it('reads the same place from end B', () => {
    // 250 m of cable from B on the 504 m run is 254 m from A: the same chainage 250 m.
    const pos = routePosition(run, 'B', 250, { startM: 240, endM: 260 });
    expect(placeOnGround(markers, pos)!.point.latitude).toBeCloseTo(-30.00135, 9);
  });
});

describe('checking marker coordinates', () => {
  it('refuses half a coordinate, the unset position and markers further apart than the route allows', () => {
    expect(coordinateProblems([{ label: 'MH-1', chainageM: 0, latitude: 51.2, longitude: null }])).toEqual([
      { index: 0, field: 'longitude', message: 'marker MH-1 has a latitude but no longitude: give both or neither' },
    ]);
    expect(coordinateProblems([{ label: 'MH-1', chainageM: 0, latitude: 0, longitude: 0 }])[0].message).toMatch(/unset position/);
    // 0.0018° of a meridian is 200.15 m; with MH-2 only 150 m further along the route that is 50 m too far (beyond 20 m).
    const far = coordinateProblems([markers[1], { ...markers[0], chainageM: 150 }]);
    expect(far).toEqual([
      {
        index: 0,
        field: 'latitude',
        message: 'marker MH-2 is 200 m from MH-1 in a straight line but only 150.0 m further along the route: check its coordinates or its chainage',
      },
    ]);
    // 200.15 m straight for 200 m along the route is within a receiver's error.
    expect(coordinateProblems(markers)).toEqual([]);
    expect(coordinateProblems([{ label: 'P-1', chainageM: 5 }])).toEqual([]);
  });
});

describe('files for the crew', () => {
  const place = placeOnGround(markers, { chainageM: 250, windowStartChainageM: 240, windowEndChainageM: 260 })!;
  const input = {
    name: 'Fault <test> & run',
    description: '150.0 m past MH-1 toward MH-2',
    place,
    markers: markers.map((m) => ({ label: m.label, description: 'manhole', latitude: m.latitude!, longitude: m.longitude! })),
  };

  it('writes a geo: URI with the window as its uncertainty (RFC 5870 §3.3)', () => {
    expect(geoUri(place.point, place.radiusM)).toBe('geo:-30.001350,-15.000000;u=11');
    expect(geoUri({ latitude: 13.4125, longitude: 103.8667 })).toBe('geo:13.412500,103.866700');
  });

  it('writes GeoJSON with longitude first (RFC 7946 §3.1.1)', () => {
    const g = JSON.parse(locationGeoJson(input));
    expect(g.type).toBe('FeatureCollection');
    expect(g.features[0].geometry).toEqual({ type: 'Point', coordinates: [-15, -30.00135] });
    expect(g.features[0].properties.name).toBe('Fault <test> & run');
    expect(g.features[1].geometry.type).toBe('LineString');
    expect(g.features[1].geometry.coordinates).toEqual([
      [-15, -30.00126],
      [-15, -30.00144],
    ]);
    expect(g.features.slice(2).map((f: { properties: { name: string } }) => f.properties.name)).toEqual(['MH-1', 'MH-2']);
  });

  it('writes GPX 1.1 way points and the window as a track, with text escaped', () => {
    const gpx = locationGpx(input);
    expect(gpx).toContain('<gpx version="1.1" creator="Rholog" xmlns="http://www.topografix.com/GPX/1/1">');
    expect(gpx).toContain('<wpt lat="-30.001350" lon="-15.000000">\n    <name>Fault &lt;test&gt; &amp; run</name>');
    expect(gpx.match(/<wpt /g)).toHaveLength(5); // the fault, the window's two ends, two markers
    expect(gpx.match(/<trkpt /g)).toHaveLength(2);
    expect(gpx).not.toMatch(/<test>/);
  });
});
