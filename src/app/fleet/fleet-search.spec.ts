import { foldText, matchesSearch, searchTerms } from './fleet-search';

// Accents are removed by Unicode canonical decomposition (NFD, Unicode Standard Annex #15) and dropping the combining marks.
describe('fleet search', () => {
  it('folds case and accents', () => {
    expect(foldText('Pompe À Incendie')).toBe('pompe a incendie');
    // ø is a letter of its own, not o with a mark: it stays
    expect(foldText('Søndre Ånes Ĉapo')).toBe('søndre anes capo');
  });

  it('splits the search into words', () => {
    expect(searchTerms('  genset   NORTH ')).toEqual(['genset', 'north']);
    expect(searchTerms('   ')).toEqual([]);
  });

  it('needs every word in the engine or the site name', () => {
    const terms = searchTerms('riverside 2');
    expect(matchesSearch(terms, 'Genset 2', 'Riverside Works')).toBe(true);
    expect(matchesSearch(terms, 'Genset 1', 'Riverside Works')).toBe(false);
    expect(matchesSearch([], 'Anything', 'Anywhere')).toBe(true);
  });
});
