import { Routes } from '@angular/router';

export const CORPORA_ROUTES: Routes = [
  {
    path: '',
    title: 'Corpora · Noisewright',
    loadComponent: () => import('./corpus-list/corpus-list').then((m) => m.CorpusList),
  },
  {
    path: 'upload',
    title: 'Upload a corpus · Noisewright',
    loadComponent: () => import('./corpus-upload/corpus-upload').then((m) => m.CorpusUpload),
  },
  {
    path: ':corpusId',
    title: 'Corpus · Noisewright',
    loadComponent: () => import('./corpus-detail/corpus-detail').then((m) => m.CorpusDetailPage),
  },
];
