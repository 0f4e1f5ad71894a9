import { render } from 'preact';
import { ExpectPage } from './ExpectPage';
import './styles.css';

const root = document.getElementById('app');
if (root === null) throw new Error('index.html has no #app element');
render(<ExpectPage />, root);
