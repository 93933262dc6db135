/**
 * The site views that are not the first screen (estimate, site figures,
 * what-if, survey plan), in one chunk loaded when a site opens, so that the
 * first screen's JavaScript stays small. The service worker precaches it
 * with the rest of the build, so it loads offline too.
 */
export { EstimateView } from './estimate-view';
export { FiguresView } from './figures-view';
export { LayerBuilderView } from './layer-builder';
export { RecordsView } from './records-view';
export { ProfileView } from './profile-view';
export { SurveyView } from './survey-view';
export { WhatIfView } from './whatif-view';
