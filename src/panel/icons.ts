import { LabIcon } from '@jupyterlab/ui-components';
import logoSvg from '../../style/icons/perpend.svg';

/** Perpend's own icon: a perpendicular over a wave (projection off a subspace). */
export const perpendIcon = new LabIcon({ name: 'perpend:logo', svgstr: logoSvg });
