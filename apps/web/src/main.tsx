import { render } from 'solid-js/web';
import { App } from './app.js';
import './styles.css';

render(() => <App />, document.getElementById('root')!);
