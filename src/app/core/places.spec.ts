import { isFocusedPage, PLACES, placeOf } from './places';

describe('places', () => {
  it('when the competency matrix is open, then Competencies is the current place and People is not, though its path starts the address', () => {
    expect(placeOf(PLACES, '/people/competencies')).toBe('/people/competencies');
    expect(placeOf(PLACES, '/people/competencies?person=p1')).toBe('/people/competencies');
    expect(placeOf(PLACES, '/people')).toBe('/people');
    expect(placeOf(PLACES, '/people/mail')).toBe('/people');
  });

  it('when a page lies under a place, then that place is current; an address under none has no current place', () => {
    expect(placeOf(PLACES, '/machines/m1')).toBe('/machines');
    expect(placeOf(PLACES, '/records/r1/check')).toBe('/records');
    expect(placeOf(PLACES, '/today')).toBe('/today');
    expect(placeOf(PLACES, '/machinesque')).toBeNull();
    expect(placeOf(PLACES.filter((p) => p.path !== '/people/competencies'), '/people/competencies')).toBe('/people');
  });

  it('when one record is open in the runner, then the page is focused; its Record check and the list are not', () => {
    expect(isFocusedPage('/records/0b6f8c1e-5d2a-4c7e-9f00-1a2b3c4d5e6f')).toBeTrue();
    expect(isFocusedPage('/records/r1?step=2')).toBeTrue();
    expect(isFocusedPage('/records/r1/check')).toBeFalse();
    expect(isFocusedPage('/records')).toBeFalse();
    expect(isFocusedPage('/machines/m1')).toBeFalse();
  });
});
