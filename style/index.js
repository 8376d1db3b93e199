import './base.css';
import './workbench.css';
import './plots.css';
