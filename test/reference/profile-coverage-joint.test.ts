/**
 * Coverage of the layered estimate, two layers from 8 Love and 8 Rayleigh picks jointly: 200 seeded noisy trials at the
 * default effort (issue 13 asks for at least 200), the same trials as the
 * bench and the README's rates. The reference and the 3-binomial-SD rule:
 * profile-coverage.test.ts. Also checked: the share of fits poorer than the
 * pick errors allow (χ² above its 95 % point, so about 5 % of honest fits,
 * binomial: at most 5 % + 3·√(0.05·0.95/200) ≈ 9.6 %, 19 of 200), and that
 * the search finds the deepest basin (the true model fits better than the
 * best fit found in at most 1 % of trials).
 */
import { describeCoverage200 } from './profile-coverage-200';

describeCoverage200('Love 8 + Rayleigh 8', 'two layers from 8 Love and 8 Rayleigh picks jointly');
